/**
 * The purge tables (migrations/20261201_0005_purge.ts) and the telemetry rows the proof and the
 * separator page read: rows in, domain objects out.
 */
import type { Kysely, Transaction } from 'kysely';
import type { PurgeSchedule, QuietWindow } from '$lib/purge';
import type { ValveReport } from '$lib/purge';
import type { Database } from '../db/schema';
import type { PurgeCommandsTable, PurgeOutcome } from '../db/tables/purge';

type Db = Kysely<Database> | Transaction<Database>;

export interface StoredSchedule extends PurgeSchedule {
	vessel_id: number;
	updated_at: number;
	updated_by: string | null;
}

export type CommandRow = PurgeCommandsTable;

export interface VesselFacts {
	id: number;
	code: string;
	time_zone: string;
}

function parseQuiet(text: string): QuietWindow[] {
	try {
		const v = JSON.parse(text);
		return Array.isArray(v)
			? v.filter((w) => typeof w?.from === 'string' && typeof w?.to === 'string')
			: [];
	} catch {
		return [];
	}
}

export async function getSchedule(db: Db, vesselId: number): Promise<StoredSchedule | undefined> {
	const row = await db
		.selectFrom('purge_schedules')
		.selectAll()
		.where('vessel_id', '=', vesselId)
		.executeTakeFirst();
	return row && toSchedule(row);
}

export async function listSchedules(db: Db): Promise<StoredSchedule[]> {
	const rows = await db.selectFrom('purge_schedules').selectAll().execute();
	return rows.map(toSchedule);
}

function toSchedule(row: Database['purge_schedules']): StoredSchedule {
	return {
		vessel_id: row.vessel_id,
		enabled: row.enabled === 1,
		interval_min: row.interval_min,
		duration_s: row.duration_s,
		offset_min: row.offset_min,
		quiet_hours: parseQuiet(row.quiet_hours),
		updated_at: row.updated_at,
		updated_by: row.updated_by
	};
}

export async function saveSchedule(
	db: Db,
	vesselId: number,
	s: PurgeSchedule,
	at: number,
	by: string
): Promise<void> {
	const values = {
		enabled: s.enabled ? 1 : 0,
		interval_min: s.interval_min,
		duration_s: s.duration_s,
		offset_min: s.offset_min,
		quiet_hours: JSON.stringify(s.quiet_hours.map((w) => ({ from: w.from, to: w.to }))),
		updated_at: at,
		updated_by: by
	};
	await db
		.insertInto('purge_schedules')
		.values({ vessel_id: vesselId, ...values })
		.onConflict((oc) => oc.column('vessel_id').doUpdateSet(values))
		.execute();
}

export async function vesselFacts(db: Db, vesselId: number): Promise<VesselFacts | undefined> {
	return db
		.selectFrom('vessels')
		.select(['id', 'code', 'time_zone'])
		.where('id', '=', vesselId)
		.executeTakeFirst();
}

export async function allVesselFacts(db: Db): Promise<VesselFacts[]> {
	return db.selectFrom('vessels').select(['id', 'code', 'time_zone']).execute();
}

export async function insertCommand(db: Db, row: CommandRow): Promise<void> {
	await db.insertInto('purge_commands').values(row).execute();
}

export async function getCommand(db: Db, id: string): Promise<CommandRow | undefined> {
	return db.selectFrom('purge_commands').selectAll().where('id', '=', id).executeTakeFirst();
}

export async function updateCommand(
	db: Db,
	id: string,
	values: Partial<Omit<CommandRow, 'id'>>
): Promise<void> {
	await db.updateTable('purge_commands').set(values).where('id', '=', id).execute();
}

export async function pendingCommands(db: Db): Promise<CommandRow[]> {
	return db
		.selectFrom('purge_commands')
		.selectAll()
		.where('outcome', '=', 'pending')
		.orderBy('requested_at')
		.execute();
}

/** Commands of a vessel requested in [from, to], newest first. */
export async function listCommands(
	db: Db,
	vesselId: number,
	from: number,
	to: number,
	limit: number
): Promise<CommandRow[]> {
	return db
		.selectFrom('purge_commands')
		.selectAll()
		.where('vessel_id', '=', vesselId)
		.where('requested_at', '>=', from)
		.where('requested_at', '<=', to)
		.orderBy('requested_at', 'desc')
		.limit(limit)
		.execute();
}

/** When each vessel's schedule last issued a command (a restart inside that minute must not purge twice). */
export async function lastScheduledAt(db: Db): Promise<Map<number, number>> {
	const rows = await db
		.selectFrom('purge_commands')
		.select(['vessel_id', (eb) => eb.fn.max('requested_at').as('at')])
		.where('source', '=', 'schedule')
		.groupBy('vessel_id')
		.execute();
	return new Map(rows.map((r) => [r.vessel_id, Number(r.at)]));
}

/** Done commands whose ΔP after the purge is still unknown (it needs a minute of samples after closing). */
export async function commandsWithoutDpAfter(db: Db, since: number): Promise<CommandRow[]> {
	return db
		.selectFrom('purge_commands')
		.selectAll()
		.where('outcome', '=', 'done')
		.where('dp_after_bar', 'is', null)
		.where('closed_at', 'is not', null)
		.where('requested_at', '>=', since)
		.execute();
}

/**
 * The stored valve reports of a vessel from `since` on: each purge event as its open and close.
 * The ingest writes valve_events from the same open/closed changes the proof listens to.
 */
export async function storedValveReports(
	db: Db,
	vesselId: number,
	since: number
): Promise<ValveReport[]> {
	const rows = await db
		.selectFrom('valve_events')
		.select(['opened_at', 'closed_at'])
		.where('vessel_id', '=', vesselId)
		.where((eb) =>
			eb.or([
				eb('opened_at', '>=', since),
				eb('closed_at', '>=', since),
				eb('closed_at', 'is', null)
			])
		)
		.orderBy('opened_at')
		.execute();
	const reports: ValveReport[] = [];
	for (const r of rows) {
		reports.push({ at: r.opened_at, state: 'open' });
		if (r.closed_at !== null) reports.push({ at: r.closed_at, state: 'closed' });
	}
	const latest = await db
		.selectFrom('separator_states')
		.select(['ts', 'purge_valve'])
		.where('vessel_id', '=', vesselId)
		.where('purge_valve', 'is not', null)
		.where('ts', '>=', since)
		.orderBy('ts', 'desc')
		.limit(1)
		.executeTakeFirst();
	// The latest state report tells the proof how far the gateway's reports have come.
	if (latest?.purge_valve) reports.push({ at: latest.ts, state: latest.purge_valve });
	return reports;
}

/** Raw ΔP readings of a vessel in [from, to], oldest first. */
export async function dpSamples(db: Db, vesselId: number, from: number, to: number) {
	const rows = await db
		.selectFrom('separator_states')
		.select(['ts', 'dp_bar'])
		.where('vessel_id', '=', vesselId)
		.where('ts', '>=', from)
		.where('ts', '<=', to)
		.where('dp_bar', 'is not', null)
		.orderBy('ts')
		.execute();
	return rows.map((r) => ({ at: r.ts, dp_bar: r.dp_bar as number }));
}

/** 1-minute ΔP means of a vessel in [from, to], stamped at the middle of their minute. */
export async function dpMinutes(db: Db, vesselId: number, from: number, to: number) {
	const rows = await db
		.selectFrom('separator_rollup_1m')
		.select(['bucket', 'n', 'dp_sum', 'dp_min', 'dp_max'])
		.where('vessel_id', '=', vesselId)
		.where('bucket', '>=', from - 60_000)
		.where('bucket', '<=', to)
		.where('n', '>', 0)
		.orderBy('bucket')
		.execute();
	return rows
		.filter((r) => r.dp_min !== null)
		.map((r) => ({
			at: r.bucket + 30_000,
			dp_bar: r.dp_sum / r.n,
			dp_min_bar: r.dp_min as number,
			dp_max_bar: r.dp_max as number
		}));
}

/** Purge events (valve open → closed) of a vessel overlapping [from, to]. */
export async function valveEvents(db: Db, vesselId: number, from: number, to: number) {
	return db
		.selectFrom('valve_events')
		.select(['opened_at', 'closed_at', 'dp_before_bar'])
		.where('vessel_id', '=', vesselId)
		.where('opened_at', '<=', to)
		.where((eb) => eb.or([eb('closed_at', '>=', from), eb('closed_at', 'is', null)]))
		.orderBy('opened_at')
		.execute();
}

export type { PurgeOutcome };
