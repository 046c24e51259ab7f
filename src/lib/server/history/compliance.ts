/**
 * Compliance of a shaft over a period: the share of time with flow at or
 * above the minimum (from rollups plus the raw edges, see
 * $lib/history/period-plan), the lowest flow and when, time in each alarm,
 * alarm counts, and the separator's purges.
 */
import { sql, type Kysely } from 'kysely';
import { sharesOf } from '$lib/compliance';
import { minimumAt, minimumsDuring, type MinimumSpan } from '$lib/minimums';
import { summariseAlarms, summarisePurges } from '$lib/history/alarm-time';
import {
	combinePieces,
	edgePiece,
	planPeriod,
	type PieceSummary,
	type RawPoint,
	type Span
} from '$lib/history/period-plan';
import type { Database } from '../db/schema';
import type { AlarmItem, CoverageRead, PurgeItem, ShaftCompliance } from '$lib/history/types';

export type { ShaftCompliance };

/** Event lists in a compliance answer stop here; the counts are always complete. */
export const MAX_ITEMS = 500;

export interface CoverageResult extends PieceSummary {
	/** rows read, by source: how the figure was computed */
	read: CoverageRead;
}

async function rollupPiece(
	db: Kysely<Database>,
	table: 'rollup_1m' | 'rollup_1h',
	shaftId: number,
	span: Span
): Promise<PieceSummary & { rows: number }> {
	const sums = await db
		.selectFrom(table)
		.select((eb) => [
			eb.fn.coalesce(eb.fn.sum<number>('covered_ms'), sql.lit(0)).as('covered'),
			eb.fn.coalesce(eb.fn.sum<number>('below_ms'), sql.lit(0)).as('below'),
			eb.fn.countAll<number>().as('rows')
		])
		.where('shaft_id', '=', shaftId)
		.where('bucket', '>=', span.from)
		.where('bucket', '<', span.to)
		.executeTakeFirstOrThrow();
	const lowest = await db
		.selectFrom(table)
		.select(['flow_min', 'flow_min_at'])
		.where('shaft_id', '=', shaftId)
		.where('bucket', '>=', span.from)
		.where('bucket', '<', span.to)
		.where('flow_min', 'is not', null)
		.orderBy('flow_min')
		.orderBy('flow_min_at')
		.limit(1)
		.executeTakeFirst();
	return {
		covered_ms: Number(sums.covered),
		below_ms: Number(sums.below),
		flow_min: lowest?.flow_min ?? null,
		flow_min_at: lowest?.flow_min_at ?? null,
		rows: Number(sums.rows)
	};
}

/** The raw rows one edge needs: those inside it, the last before and the first at or after its end. */
async function edgePoints(db: Kysely<Database>, shaftId: number, span: Span): Promise<RawPoint[]> {
	const base = () =>
		db.selectFrom('samples').select(['ts', 'flow_lpm']).where('shaft_id', '=', shaftId);
	const before = await base()
		.where('ts', '<', span.from)
		.orderBy('ts', 'desc')
		.limit(1)
		.executeTakeFirst();
	const inside = await base()
		.where('ts', '>=', span.from)
		.where('ts', '<', span.to)
		.orderBy('ts')
		.execute();
	const after = await base().where('ts', '>=', span.to).orderBy('ts').limit(1).executeTakeFirst();
	return [...(before ? [before] : []), ...inside, ...(after ? [after] : [])];
}

/** Coverage and lowest flow of [from, to) for one shaft, read from rollups and the raw edges. */
export async function coverageOf(
	db: Kysely<Database>,
	shaftId: number,
	from: number,
	to: number,
	gapMs: number,
	minimums: readonly MinimumSpan[]
): Promise<CoverageResult> {
	const plan = planPeriod(from, to);
	const pieces: PieceSummary[] = [];
	const read = { hour_rows: 0, minute_rows: 0, raw_rows: 0 };
	if (plan.hours) {
		const p = await rollupPiece(db, 'rollup_1h', shaftId, plan.hours);
		read.hour_rows += p.rows;
		pieces.push(p);
	}
	for (const span of plan.minutes) {
		const p = await rollupPiece(db, 'rollup_1m', shaftId, span);
		read.minute_rows += p.rows;
		pieces.push(p);
	}
	for (const span of plan.raw) {
		const points = await edgePoints(db, shaftId, span);
		read.raw_rows += points.length;
		pieces.push(edgePiece(points, span, gapMs, minimums));
	}
	return { ...combinePieces(pieces), read };
}

export interface ComplianceInput {
	shaftId: number;
	vesselId: number;
	from: number;
	to: number;
	now: number;
	gapMs: number;
	/** the shaft's minimums over time (ShaftHistory.minimums): each sample is judged by the one then in force */
	minimums: readonly MinimumSpan[];
	/** include the alarm and purge lists (for charts and reports) */
	items?: boolean;
}

/** The shaft's alarms and its vessel's separator alarms that overlap [from, to). */
export async function alarmsIn(
	db: Kysely<Database>,
	vesselId: number,
	shaftId: number,
	from: number,
	to: number
) {
	return db
		.selectFrom('alarms')
		.select([
			'id',
			'shaft_id',
			'type',
			'priority',
			'state',
			'raised_at',
			'ended_at',
			'value',
			'limit_value'
		])
		.where('vessel_id', '=', vesselId)
		.where((eb) => eb.or([eb('shaft_id', '=', shaftId), eb('shaft_id', 'is', null)]))
		.where('raised_at', '<', to)
		.where((eb) => eb.or([eb('ended_at', 'is', null), eb('ended_at', '>', from)]))
		.orderBy('raised_at')
		.orderBy('id')
		.execute();
}

/** The vessel's purge commands requested in [from, to). */
export async function purgesIn(db: Kysely<Database>, vesselId: number, from: number, to: number) {
	return db
		.selectFrom('purge_commands')
		.select([
			'id',
			'requested_at',
			'requested_by',
			'source',
			'outcome',
			'finding',
			'duration_s',
			'opened_at',
			'closed_at'
		])
		.where('vessel_id', '=', vesselId)
		.where('requested_at', '>=', from)
		.where('requested_at', '<', to)
		.orderBy('requested_at')
		.execute();
}

export async function shaftCompliance(
	db: Kysely<Database>,
	input: ComplianceInput
): Promise<ShaftCompliance> {
	const { shaftId, vesselId, from, now, gapMs, minimums } = input;
	// time that has not happened yet is not unknown: it is not in the period
	const to = Math.max(from, Math.min(input.to, now));
	const cov = await coverageOf(db, shaftId, from, to, gapMs, minimums);
	const shares = sharesOf(cov, to - from);
	const alarms = await alarmsIn(db, vesselId, shaftId, from, to);
	const purges = await purgesIn(db, vesselId, from, to);
	const result: ShaftCompliance = {
		shaft_id: shaftId,
		from,
		to,
		requested_to: input.to,
		period_s: (to - from) / 1000,
		min_flow_lpm: minimumAt(minimums, to - 1),
		minimums: minimumsDuring(minimums, from, to),
		stale_after_s: gapMs / 1000,
		share_at_or_above_min: shares.share_at_or_above_min,
		share_below_min: shares.share_below_min,
		share_unknown: shares.share_unknown,
		share_at_or_above_min_of_known: shares.share_at_or_above_min_of_known,
		seconds_at_or_above_min: (to - from) / 1000 - shares.seconds_below_min - shares.seconds_unknown,
		seconds_below_min: shares.seconds_below_min,
		seconds_unknown: shares.seconds_unknown,
		min_flow_lpm_observed: cov.flow_min,
		min_flow_at: cov.flow_min_at,
		read: cov.read,
		alarms: summariseAlarms(alarms, from, to, now),
		purges: summarisePurges(purges)
	};
	if (input.items) {
		result.alarms.items = alarms.slice(0, MAX_ITEMS);
		result.alarms.items_truncated = alarms.length > MAX_ITEMS;
		result.purges.items = purges.slice(0, MAX_ITEMS);
		result.purges.items_truncated = purges.length > MAX_ITEMS;
	}
	return result;
}
