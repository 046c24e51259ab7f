/**
 * Did the valve do what the purge command asked? From the separator's state reports
 * (`purge_valve: "open" | "closed"` with the gateway's timestamp) after a command was sent.
 *
 * A command is done when the valve reports open soon after it and closed again after about its
 * duration. It is missed when the valve never opened in time or closed so early that the
 * purge did not happen (both raise purge_missed), and stuck open when it stayed open far longer
 * than commanded (its own warning: sediment-laden water, then clean water, runs overboard and the
 * bearing supply loses pressure).
 *
 * The default tolerances are common practice for timer-driven purge valves reporting through a
 * gateway, not published figures; the server may pass its own.
 */

export interface PurgeCommand {
	/** epoch ms, server clock */
	sent_at: number;
	duration_s: number;
}

export interface ValveReport {
	/** epoch ms, gateway clock */
	at: number;
	state: 'open' | 'closed';
}

export interface PurgeTolerances {
	/** s: the valve must report open this soon after the command */
	open_within_s: number;
	/** s: an open report this much before `sent_at` still counts (gateway clock running ahead) */
	clock_skew_s: number;
	/** open for less than this fraction of the duration is not a purge */
	min_open_fraction: number;
	/** open for more than max_open_factor × duration + max_open_extra_s is stuck open */
	max_open_factor: number;
	/** s */
	max_open_extra_s: number;
	/** s: how long to wait for reports that arrive late before deciding on their absence */
	report_lag_s: number;
}

/**
 * Common practice, not published figures: 30 s to open, done between 0.5× and 2× duration + 10 s
 * open, 20 s for late reports (so stuck open is decided 2× duration + 30 s after opening).
 */
export const DEFAULT_PURGE_TOLERANCES: Readonly<PurgeTolerances> = Object.freeze({
	open_within_s: 30,
	clock_skew_s: 5,
	min_open_fraction: 0.5,
	max_open_factor: 2,
	max_open_extra_s: 10,
	report_lag_s: 20
});

export type PurgeOutcome = 'pending' | 'done' | 'missed' | 'valve_stuck_open';

/** Why: shown beside the outcome. */
export type PurgeFinding =
	| 'waiting_to_open'
	| 'not_opened'
	| 'waiting_to_close'
	| 'closed_early'
	| 'closed_in_time'
	| 'open_too_long';

export interface PurgeJudgement {
	outcome: PurgeOutcome;
	finding: PurgeFinding;
	opened_at?: number;
	closed_at?: number;
	/** s, only once the valve has closed */
	open_s?: number;
}

const MS_PER_S = 1000;

function withDefaults(tolerances?: Partial<PurgeTolerances>): PurgeTolerances {
	return { ...DEFAULT_PURGE_TOLERANCES, ...tolerances };
}

/** s: open longer than this is stuck open */
export function maxOpenS(durationS: number, tolerances?: Partial<PurgeTolerances>): number {
	const t = withDefaults(tolerances);
	return t.max_open_factor * durationS + t.max_open_extra_s;
}

/**
 * Epoch ms from which `judgePurge` no longer answers pending, whatever the reports: the latest
 * the valve may open, plus the longest it may stay open, plus the wait for late reports. The
 * server schedules its check for then (reports may decide it sooner).
 */
export function decideBy(command: PurgeCommand, tolerances?: Partial<PurgeTolerances>): number {
	const t = withDefaults(tolerances);
	const s = t.open_within_s + maxOpenS(command.duration_s, t) + t.report_lag_s;
	return command.sent_at + s * MS_PER_S;
}

/**
 * Judges a command from the valve reports known at `now` (epoch ms). Reports may come in any
 * order; a report timed after a window ends is taken as proof that nothing more will arrive for
 * that window (one gateway's reports arrive in order), so the answer can come before the wait.
 */
export function judgePurge(
	command: PurgeCommand,
	valve: readonly ValveReport[],
	now: number,
	tolerances?: Partial<PurgeTolerances>
): PurgeJudgement {
	const t = withDefaults(tolerances);
	const lagMs = t.report_lag_s * MS_PER_S;
	const reports = valve.filter((r) => Number.isFinite(r.at)).sort((a, b) => a.at - b.at);
	const latest = reports.length ? reports[reports.length - 1].at : -Infinity;

	const earliest = command.sent_at - t.clock_skew_s * MS_PER_S;
	const openBy = command.sent_at + t.open_within_s * MS_PER_S;
	const opened = reports.find((r) => r.state === 'open' && r.at >= earliest && r.at <= openBy);
	if (!opened) {
		if (now < openBy + lagMs && latest <= openBy)
			return { outcome: 'pending', finding: 'waiting_to_open' };
		return { outcome: 'missed', finding: 'not_opened' };
	}

	const opened_at = opened.at;
	const closed = reports.find((r) => r.state === 'closed' && r.at > opened_at);
	if (!closed) {
		const stuckAt = opened_at + maxOpenS(command.duration_s, t) * MS_PER_S;
		if (now < stuckAt + lagMs && latest <= stuckAt) {
			return { outcome: 'pending', finding: 'waiting_to_close', opened_at };
		}
		return { outcome: 'valve_stuck_open', finding: 'open_too_long', opened_at };
	}

	const closed_at = closed.at;
	const open_s = (closed_at - opened_at) / MS_PER_S;
	const base = { opened_at, closed_at, open_s };
	if (open_s < t.min_open_fraction * command.duration_s) {
		return { outcome: 'missed', finding: 'closed_early', ...base };
	}
	if (open_s > maxOpenS(command.duration_s, t)) {
		return { outcome: 'valve_stuck_open', finding: 'open_too_long', ...base };
	}
	return { outcome: 'done', finding: 'closed_in_time', ...base };
}
