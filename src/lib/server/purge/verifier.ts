/**
 * The proof that a purge happened: every pending command is judged ($lib/purge judgePurge) from the
 * separator's valve reports as they arrive, and again when the next decision falls due (at the
 * latest at decideBy), so no command stays pending. A missed purge raises purge_missed and a later
 * done purge clears it; a valve open too long raises purge_valve_stuck_open, cleared when it closes.
 *
 * Reports are the gateway's own timestamps (its clock), commands the server's; judgePurge allows
 * for the skew between them.
 */
import {
	DEFAULT_PURGE_TOLERANCES,
	DEFAULT_TREND_OPTIONS,
	decideBy,
	dpTrend,
	judgePurge,
	maxOpenS,
	type PurgeJudgement,
	type PurgeTolerances,
	type ValveReport
} from '$lib/purge';
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import type { AlarmEngine } from '../alarms/engine';
import * as repo from './repository';
import type { CommandRow } from './repository';

const MS_PER_S = 1000;
/** ms after the planned decision time, so the judgement sees that instant as passed */
const DECISION_MARGIN_MS = 5;
/** s: ΔP after a purge is read this long after closing, once a full window of samples is stored */
const DP_AFTER_WAIT_S = DEFAULT_TREND_OPTIONS.window_s + 5;
/** reports kept per command: 2 × the longest duration (600 s) + margins, at 1 Hz, with room to spare */
const MAX_REPORTS = 10_000;

interface Pending {
	row: CommandRow;
	/** valve state changes and the latest state report, gateway clock */
	reports: ValveReport[];
	timer: NodeJS.Timeout | null;
}

export interface VerifierDeps {
	db: Kysely<Database>;
	engine: () => AlarmEngine | undefined;
	/** flushes ingest so the stored ΔP readings are complete up to now */
	drain: () => Promise<void>;
	log: (line: string) => void;
	now?: () => number;
}

export class PurgeVerifier {
	/** Tolerances passed to judgePurge; the defaults are common practice ($lib/purge/proof.ts). */
	tolerances: Partial<PurgeTolerances> = {};
	/** ms after a done purge is decided before its ΔP after is read (a window of readings must be stored) */
	dpAfterDelayMs = DP_AFTER_WAIT_S * MS_PER_S;
	#pending = new Map<string, Pending>();
	#timers = new Set<NodeJS.Timeout>();
	#work = new Set<Promise<unknown>>();
	#stopped = false;
	readonly #now: () => number;

	constructor(private readonly deps: VerifierDeps) {
		this.#now = deps.now ?? Date.now;
	}

	hasPending(vesselId: number): boolean {
		for (const p of this.#pending.values()) if (p.row.vessel_id === vesselId) return true;
		return false;
	}

	pendingIds(): string[] {
		return [...this.#pending.keys()];
	}

	/** Starts watching a command just recorded (before it is published, so no early report is lost). */
	track(row: CommandRow, reports: ValveReport[] = []) {
		if (this.#stopped) return;
		const pending: Pending = { row, reports: [...reports], timer: null };
		this.#pending.set(row.id, pending);
		this.#judge(pending);
	}

	/** The broker did not take the command: it is missed, and says why. */
	async publishFailed(id: string, raiseAlarm: boolean) {
		const pending = this.#pending.get(id);
		if (!pending) return;
		await this.#settle(
			pending,
			{ outcome: 'missed', finding: 'not_opened' },
			'publish_failed',
			raiseAlarm
		);
	}

	/** A separator state report with the valve's state, newest or a replay of the past. */
	report(vesselId: number, report: ValveReport) {
		for (const p of this.#pending.values()) {
			if (p.row.vessel_id !== vesselId) continue;
			// at 1 Hz a command collects at most a few thousand reports before it is decided
			if (p.reports.length < MAX_REPORTS) p.reports.push(report);
			else p.reports[p.reports.length - 1] = report;
			this.#judge(p);
		}
	}

	/** The valve reported closed: whatever kept it open is over. */
	valveClosed(vesselId: number) {
		this.deps.engine()?.clear(vesselId, null, 'purge_valve_stuck_open');
	}

	/** Re-judges commands left pending by a previous run, from the stored valve events. */
	async restore() {
		const rows = await repo.pendingCommands(this.deps.db);
		const skewMs = this.tolerancesFull().clock_skew_s * MS_PER_S;
		for (const row of rows) {
			const reports = await repo.storedValveReports(
				this.deps.db,
				row.vessel_id,
				row.requested_at - skewMs
			);
			this.track(row, reports);
		}
		await this.idle();
		// ΔP after purges that closed just before the previous run stopped (looking back a week)
		const since = this.#now() - 7 * 86_400_000;
		for (const row of await repo.commandsWithoutDpAfter(this.deps.db, since))
			this.#run(this.#recordDp(row.id));
	}

	/** Waits for settlements and ΔP updates under way. */
	async idle() {
		while (this.#work.size) await Promise.allSettled([...this.#work]);
	}

	async stop() {
		this.#stopped = true;
		for (const p of this.#pending.values()) if (p.timer) clearTimeout(p.timer);
		for (const t of this.#timers) clearTimeout(t);
		this.#timers.clear();
		await this.idle();
		this.#pending.clear();
	}

	#run(p: Promise<unknown>) {
		const tracked = p.catch((err) => this.deps.log(`purge proof: ${String(err)}`));
		this.#work.add(tracked);
		void tracked.finally(() => this.#work.delete(tracked));
	}

	#judge(pending: Pending) {
		if (this.#stopped || !this.#pending.has(pending.row.id)) return;
		const command = { sent_at: pending.row.requested_at, duration_s: pending.row.duration_s };
		const now = this.#now();
		const j = judgePurge(command, pending.reports, now, this.tolerances);
		if (j.outcome !== 'pending') {
			this.#run(this.#settle(pending, j, j.finding, true));
			return;
		}
		// the earliest instant at which the judgement can change without a new report
		const t = this.tolerancesFull();
		const lagMs = t.report_lag_s * MS_PER_S;
		const next =
			j.finding === 'waiting_to_open'
				? command.sent_at + t.open_within_s * MS_PER_S + lagMs
				: (j.opened_at ?? command.sent_at) + maxOpenS(command.duration_s, t) * MS_PER_S + lagMs;
		const at = Math.min(next, decideBy(command, t));
		if (pending.timer) clearTimeout(pending.timer);
		pending.timer = setTimeout(
			() => this.#judge(pending),
			Math.max(0, at - now) + DECISION_MARGIN_MS
		);
		pending.timer.unref();
	}

	tolerancesFull(): PurgeTolerances {
		return { ...DEFAULT_PURGE_TOLERANCES, ...this.tolerances };
	}

	async #settle(pending: Pending, j: PurgeJudgement, finding: string, raiseAlarm: boolean) {
		const { row } = pending;
		if (!this.#pending.has(row.id)) return;
		this.#pending.delete(row.id);
		if (pending.timer) clearTimeout(pending.timer);
		const decidedAt = this.#now();
		let dpBefore: number | null = null;
		if (j.opened_at !== undefined) {
			dpBefore = await this.#dpAround(row.vessel_id, j.opened_at, j.closed_at ?? null).then(
				(d) => d.before
			);
		}
		await repo.updateCommand(this.deps.db, row.id, {
			outcome: j.outcome,
			finding,
			opened_at: j.opened_at ?? null,
			closed_at: j.closed_at ?? null,
			decided_at: decidedAt,
			dp_before_bar: dpBefore
		});
		const engine = this.deps.engine();
		if (j.outcome === 'done') {
			engine?.clear(row.vessel_id, null, 'purge_missed');
			this.#later(this.dpAfterDelayMs, () => this.#recordDp(row.id));
		} else if (j.outcome === 'missed') {
			if (raiseAlarm) engine?.raise(row.vessel_id, null, 'purge_missed');
		} else if (j.outcome === 'valve_stuck_open') {
			const limit = maxOpenS(row.duration_s, this.tolerancesFull());
			const openS =
				j.open_s ?? (j.opened_at !== undefined ? (decidedAt - j.opened_at) / MS_PER_S : null);
			engine?.raise(row.vessel_id, null, 'purge_valve_stuck_open', openS, limit);
			// closed (late) before the verdict: the alarm shows that it happened and has already returned
			if (j.closed_at !== undefined) engine?.clear(row.vessel_id, null, 'purge_valve_stuck_open');
		}
		if (j.outcome !== 'done') this.deps.log(`purge ${row.id}: ${j.outcome} (${finding})`);
	}

	#later(ms: number, work: () => Promise<unknown>) {
		const timer = setTimeout(() => {
			this.#timers.delete(timer);
			if (!this.#stopped) this.#run(work());
		}, ms);
		timer.unref();
		this.#timers.add(timer);
	}

	async #dpAround(vesselId: number, openedAt: number, closedAt: number | null) {
		const windowMs = DEFAULT_TREND_OPTIONS.window_s * MS_PER_S;
		const end = closedAt ?? openedAt;
		const samples = await repo.dpSamples(
			this.deps.db,
			vesselId,
			openedAt - windowMs,
			end + windowMs
		);
		const [p] = dpTrend(samples, [{ opened_at: openedAt, closed_at: end }]).purges;
		return {
			before: p?.dp_before_bar ?? null,
			after: closedAt === null ? null : (p?.dp_after_bar ?? null)
		};
	}

	/** ΔP before and after a done purge, from the stored readings around it. */
	async #recordDp(id: string) {
		await this.deps.drain();
		const row = await repo.getCommand(this.deps.db, id);
		if (!row || row.opened_at === null || row.closed_at === null) return;
		const dp = await this.#dpAround(row.vessel_id, row.opened_at, row.closed_at);
		await repo.updateCommand(this.deps.db, id, {
			dp_before_bar: dp.before ?? row.dp_before_bar,
			dp_after_bar: dp.after
		});
	}
}
