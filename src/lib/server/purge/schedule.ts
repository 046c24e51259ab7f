/**
 * A separator's purge schedule as the API and the page show it (in words, with the next runs in
 * vessel time and UTC), and changing it: validated by the shared schema, stored, audited with the
 * old and new values and the reason.
 */
import {
	cronExpressionFor,
	describeSchedule,
	previewRuns,
	type PurgeSchedule,
	type PurgeScheduleChange
} from '$lib/purge';
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import { audit, diff, type Actor } from '../audit';
import { notFound } from '../api/errors';
import * as repo from './repository';
import type { StoredSchedule, VesselFacts } from './repository';

/** What a separator without a stored schedule shows: paused, with a common 4-hourly start. */
export const UNSET_SCHEDULE: PurgeSchedule = Object.freeze({
	enabled: false,
	interval_min: 240,
	duration_s: 20,
	offset_min: 0,
	quiet_hours: []
}) as PurgeSchedule;

export const PREVIEW_COUNT = 10;

export interface RunView {
	/** ISO 8601, UTC */
	at: string;
	/** e.g. "2026-03-29 03:00 +02:00" */
	vessel_time: string;
	/** e.g. "2026-03-29 01:00 UTC" */
	utc: string;
	moved_by_clock_change: boolean;
}

export interface ScheduleView {
	vessel_id: number;
	vessel_code: string;
	time_zone: string;
	/** false until someone has set a schedule: then it is shown paused */
	configured: boolean;
	schedule: PurgeSchedule;
	updated_at: string | null;
	updated_by: string | null;
	description: string;
	/** the node-cron form, where one expression fits (for reading; the job ticks each minute) */
	cron_expression: string | null;
	/** the next runs, ISO 8601 */
	next_runs: string[];
	preview: RunView[];
}

export function plain(s: PurgeSchedule): PurgeSchedule {
	return {
		enabled: s.enabled,
		interval_min: s.interval_min,
		duration_s: s.duration_s,
		offset_min: s.offset_min,
		quiet_hours: s.quiet_hours.map((w) => ({ from: w.from, to: w.to }))
	};
}

export function scheduleView(
	vessel: VesselFacts,
	stored: StoredSchedule | undefined,
	now = Date.now()
): ScheduleView {
	const schedule = plain(stored ?? UNSET_SCHEDULE);
	let preview: RunView[] = [];
	try {
		preview = previewRuns(schedule, vessel.time_zone, now, PREVIEW_COUNT).map((r) => ({
			at: new Date(r.at).toISOString(),
			vessel_time: r.vessel,
			utc: r.utc,
			moved_by_clock_change: r.moved_by_clock_change
		}));
	} catch {
		// an unknown time zone leaves no preview; the vessel's configuration is where to fix it
	}
	return {
		vessel_id: vessel.id,
		vessel_code: vessel.code,
		time_zone: vessel.time_zone,
		configured: !!stored,
		schedule,
		updated_at: stored ? new Date(stored.updated_at).toISOString() : null,
		updated_by: stored?.updated_by ?? null,
		description: describeSchedule(schedule),
		cron_expression: cronExpressionFor(schedule),
		next_runs: preview.map((r) => r.at),
		preview
	};
}

export async function readSchedule(db: Kysely<Database>, vesselId: number): Promise<ScheduleView> {
	const vessel = await repo.vesselFacts(db, vesselId);
	if (!vessel) throw notFound('vessel');
	return scheduleView(vessel, await repo.getSchedule(db, vesselId));
}

/**
 * Stores a validated change, audited with the old and new values and the reason, in one
 * transaction. Returns whether anything changed (an unchanged schedule writes nothing).
 */
export async function writeSchedule(
	db: Kysely<Database>,
	vesselId: number,
	change: PurgeScheduleChange,
	actor: Actor
): Promise<boolean> {
	const { reason, ...next } = change;
	const after = plain(next);
	return db.transaction().execute(async (trx) => {
		const vessel = await repo.vesselFacts(trx, vesselId);
		if (!vessel) throw notFound('vessel');
		const stored = await repo.getSchedule(trx, vesselId);
		const before = stored ? plain(stored) : null;
		const changes = diff(before ?? ({} as PurgeSchedule), after);
		if (before && Object.keys(changes).length === 0) return false;
		const at = Date.now();
		await repo.saveSchedule(trx, vesselId, after, at, actor.name);
		await audit(trx, actor, {
			action: 'purge.schedule.update',
			entity: 'separator',
			entityId: vesselId,
			vesselId,
			at,
			details: { reason, before, after, changes, description: describeSchedule(after) }
		});
		return true;
	});
}
