/**
 * The purge schedule as one running part: the per-separator node-cron jobs, the commands they and
 * "purge now" issue, and the proof fed by the ingest pipeline's valve reports.
 *
 * Start-up: commands left pending by the previous run are judged from the stored valve events
 * (a purge that happened while the server was down is still proved), then every job is built
 * from the database. A schedule change rebuilds its vessel's job at once, as does a vessel's
 * configuration change (its time zone or code).
 */
import { randomUUID } from 'node:crypto';
import {
	MAX_DURATION_S,
	MIN_DURATION_S,
	type PurgeScheduleChange,
	type PurgeTolerances
} from '$lib/purge';
import type { AppContext } from '../context';
import type { Actor } from '../audit';
import { audit } from '../audit';
import { ApiError, notFound } from '../api/errors';
import * as repo from './repository';
import {
	commandView,
	issueCommand,
	PublishError,
	type CommandView,
	type IssueDeps
} from './commands';
import { PurgeScheduler, type JobSpec } from './scheduler';
import { PurgeVerifier } from './verifier';
import { readSchedule, UNSET_SCHEDULE, writeSchedule, type ScheduleView } from './schedule';

/** GET …/purges answers at most this many commands (newest first) */
export const MAX_LISTED_COMMANDS = 5_000;

export interface PurgeService {
	scheduler: PurgeScheduler;
	verifier: PurgeVerifier;
	getSchedule(vesselId: number): Promise<ScheduleView>;
	/** validated change → stored, audited, job rebuilt before this resolves */
	setSchedule(
		vesselId: number,
		change: PurgeScheduleChange,
		actor: Actor
	): Promise<ScheduleView & { changed: boolean }>;
	/** "purge now": 409 while a purge is under way or the valve reports open, 503 when the broker refuses */
	purgeNow(vesselId: number, actor: Actor, durationS?: number): Promise<CommandView>;
	purges(
		vesselId: number,
		from: number,
		to: number
	): Promise<{ purges: CommandView[]; truncated: boolean }>;
	/** shorter proof tolerances (tests; a later setting); the defaults are common practice */
	setTolerances(tolerances: Partial<PurgeTolerances>): void;
	stop(): Promise<void>;
}

/** A scheduled run that sent no command, recorded as missed with the reason. */
function skippedRun(vesselId: number, durationS: number, finding: string): repo.CommandRow {
	const at = Date.now();
	return {
		id: randomUUID(),
		vessel_id: vesselId,
		requested_at: at,
		requested_by: 'schedule',
		user_id: null,
		source: 'schedule',
		duration_s: durationS,
		outcome: 'missed',
		finding,
		opened_at: null,
		closed_at: null,
		decided_at: at,
		dp_before_bar: null,
		dp_after_bar: null
	};
}

export async function startPurge(ctx: AppContext): Promise<PurgeService> {
	const { db, config } = ctx;
	const telemetry = ctx.services.telemetry;
	if (!telemetry) throw new Error('purge: telemetry must start first (parts.ts)');
	const log = (line: string) => console.log(`[purge] ${line}`);

	const verifier = new PurgeVerifier({
		db,
		engine: () => ctx.services.alarms?.engine,
		drain: () => telemetry.pipeline.drain(),
		log
	});
	const issueDeps: IssueDeps = {
		db,
		verifier,
		prefix: config.MQTT_TOPIC_PREFIX,
		publish: (topic, payload) => telemetry.publish(topic, payload)
	};
	/** vessels with a command being recorded right now: two requests must not both pass the check */
	const issuing = new Set<number>();

	const vesselCode = async (vesselId: number) =>
		telemetry.registry.vesselById(vesselId)?.code ?? (await repo.vesselFacts(db, vesselId))?.code;

	/** Why a purge cannot start now, or null. */
	const busy = (vesselId: number): { code: string; message: string } | null => {
		if (issuing.has(vesselId) || verifier.hasPending(vesselId)) {
			return { code: 'purge_in_progress', message: 'a purge is under way; wait for its outcome' };
		}
		if (telemetry.pipeline.latestSeparator.get(vesselId)?.purge_valve === 'open') {
			return {
				code: 'valve_open',
				message: 'the purge valve reports open now; a purge cannot start until it closes'
			};
		}
		return null;
	};

	const issue = async (
		vesselId: number,
		code: string,
		durationS: number,
		source: 'schedule' | 'manual',
		actor: Actor | null
	) => {
		issuing.add(vesselId);
		try {
			return await issueCommand(issueDeps, {
				vesselId,
				vesselCode: code,
				durationS,
				source,
				actor
			});
		} finally {
			issuing.delete(vesselId);
		}
	};

	const specOf = (s: repo.StoredSchedule, v: repo.VesselFacts): JobSpec => ({
		vesselId: v.id,
		vesselCode: v.code,
		timeZone: v.time_zone,
		schedule: {
			enabled: s.enabled,
			interval_min: s.interval_min,
			duration_s: s.duration_s,
			offset_min: s.offset_min,
			quiet_hours: s.quiet_hours
		}
	});

	const scheduler = new PurgeScheduler({
		async load(vesselId) {
			const [s, v] = await Promise.all([
				repo.getSchedule(db, vesselId),
				repo.vesselFacts(db, vesselId)
			]);
			return s && v ? specOf(s, v) : undefined;
		},
		async loadAll() {
			const vessels = new Map((await repo.allVesselFacts(db)).map((v) => [v.id, v]));
			return (await repo.listSchedules(db)).flatMap((s) => {
				const v = vessels.get(s.vessel_id);
				return v ? [specOf(s, v)] : [];
			});
		},
		async due(spec) {
			const why = busy(spec.vesselId);
			if (why?.code === 'purge_in_progress') {
				// the command still pending carries the outcome; a second one would only blur it
				log(`scheduled purge of ${spec.vesselCode} skipped: ${why.message}`);
				return;
			}
			if (why) {
				// no command to send, but the run is on record, so a run that did not happen is seen
				await repo.insertCommand(
					db,
					skippedRun(spec.vesselId, spec.schedule.duration_s, 'valve_already_open')
				);
				return;
			}
			const code = (await vesselCode(spec.vesselId)) ?? spec.vesselCode;
			try {
				await issue(spec.vesselId, code, spec.schedule.duration_s, 'schedule', null);
			} catch (err) {
				if (!(err instanceof PublishError)) throw err;
				log(`scheduled purge of ${code} not sent: ${err.message}`);
			}
		},
		log
	});

	const unlisten = telemetry.pipeline.listen({
		separator: (e) => {
			if (e.purge_valve) verifier.report(e.vesselId, { at: e.ts, state: e.purge_valve });
		},
		valve: (e) => {
			if (e.state === 'closed') verifier.valveClosed(e.vesselId);
		}
	});
	const offConfig = ctx.events.on('config.changed', ({ vesselId }) => {
		scheduler
			.rebuild(vesselId)
			.catch((err) => log(`rebuilding the purge job of vessel ${vesselId}: ${String(err)}`));
	});

	try {
		await verifier.restore();
		scheduler.rememberRuns(await repo.lastScheduledAt(db));
		await scheduler.rebuildAll();
	} catch (err) {
		unlisten();
		offConfig();
		await scheduler.stop();
		await verifier.stop();
		throw err;
	}

	return {
		scheduler,
		verifier,
		getSchedule: (vesselId) => readSchedule(db, vesselId),
		async setSchedule(vesselId, change, actor) {
			const changed = await writeSchedule(db, vesselId, change, actor);
			if (changed) await scheduler.rebuild(vesselId);
			return { ...(await readSchedule(db, vesselId)), changed };
		},
		async purgeNow(vesselId, actor, durationS) {
			const code = await vesselCode(vesselId);
			if (!code) throw notFound('vessel');
			const stored = await repo.getSchedule(db, vesselId);
			const duration = durationS ?? stored?.duration_s ?? UNSET_SCHEDULE.duration_s;
			if (!Number.isInteger(duration) || duration < MIN_DURATION_S || duration > MAX_DURATION_S) {
				throw new ApiError(422, 'invalid', `duration_s: ${MIN_DURATION_S} to ${MAX_DURATION_S} s`, {
					duration_s: `a whole number of seconds, ${MIN_DURATION_S} to ${MAX_DURATION_S}`
				});
			}
			const why = busy(vesselId);
			if (why) throw new ApiError(409, why.code, why.message);
			let row: repo.CommandRow | null = null;
			let failure: PublishError | null = null;
			try {
				row = await issue(vesselId, code, duration, 'manual', actor);
			} catch (err) {
				if (!(err instanceof PublishError)) throw err;
				failure = err;
			}
			await audit(db, actor, {
				action: 'purge.now',
				entity: 'separator',
				entityId: vesselId,
				vesselId,
				details: {
					command_id: row?.id ?? failure?.commandId,
					duration_s: duration,
					...(failure ? { publish_failed: failure.message } : {})
				}
			});
			if (!row) {
				throw new ApiError(
					503,
					'broker_unavailable',
					`command ${failure?.commandId} was recorded but not sent: ${failure?.message}`
				);
			}
			return commandView((await repo.getCommand(db, row.id)) ?? row);
		},
		async purges(vesselId, from, to) {
			const rows = await repo.listCommands(db, vesselId, from, to, MAX_LISTED_COMMANDS + 1);
			return {
				purges: rows.slice(0, MAX_LISTED_COMMANDS).map(commandView),
				truncated: rows.length > MAX_LISTED_COMMANDS
			};
		},
		setTolerances(tolerances) {
			verifier.tolerances = { ...tolerances };
		},
		async stop() {
			offConfig();
			unlisten();
			await scheduler.stop();
			await verifier.stop();
		}
	};
}
