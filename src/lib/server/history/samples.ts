/**
 * History for charts: raw samples for short periods, 1-minute or 1-hour
 * buckets from the rollups for longer ones. Every read is a range scan of a
 * (shaft_id, ts|bucket) primary key; raw reads are capped at a day.
 *
 * These are the hottest reads of the app (a week is 10 080 buckets), and
 * measured on this machine the cost is not SQLite's — it counts a week of
 * rollups in under a millisecond — but handing each value to JavaScript
 * (~0.15 µs a value, NULL or not). So the statements are built with the
 * typed query builder, compiled once, and run as cached better-sqlite3
 * statements that return arrays (no per-row objects); means are divided in
 * SQL, and a caller that needs only some quantities (the report's flow
 * chart) reads only their columns. Read-only, so sharing Kysely's
 * connection is safe.
 */
import { sql, type RawBuilder } from 'kysely';
import type { Statement } from 'better-sqlite3';
import { bucketOf } from '$lib/compliance';
import { BUCKET_MS, RAW_MAX_MS } from '$lib/history/range';
import type { HistoryBucket, HistorySample, Quantity, Stat } from '$lib/history/types';
import type { Sqlite } from '../db/connection';
import { compiler } from '../ingest/sql-compiler';

export type { HistoryBucket, HistorySample };

export const QUANTITIES: readonly Quantity[] = ['flow_lpm', 'supply_bar', 'temp_c', 'shaft_rpm'];

export class RangeTooLong extends Error {}

/** rollup column stems of each quantity, and which count divides its sum */
const STEMS: Record<
	Quantity,
	{ stem: 'flow' | 'supply' | 'temp' | 'rpm'; n: 'n' | 'supply_n' | 'temp_n' | 'rpm_n' }
> = {
	flow_lpm: { stem: 'flow', n: 'n' },
	supply_bar: { stem: 'supply', n: 'supply_n' },
	temp_c: { stem: 'temp', n: 'temp_n' },
	shaft_rpm: { stem: 'rpm', n: 'rpm_n' }
};

const ref = (column: string): RawBuilder<number | null> => sql<number | null>`${sql.ref(column)}`;

function samplesSql(fields: readonly Quantity[]) {
	return compiler
		.selectFrom('samples')
		.select(['ts', 'flow_lpm', ...fields.filter((f) => f !== 'flow_lpm')])
		.where('shaft_id', '=', 0)
		.where('ts', '>=', 0)
		.where('ts', '<', 0)
		.orderBy('ts')
		.compile().sql;
}

function bucketsSql(table: 'rollup_1m' | 'rollup_1h', fields: readonly Quantity[]) {
	const stats = fields.flatMap((f) => {
		const { stem, n } = STEMS[f];
		return [
			ref(`${stem}_min`).as(`${stem}_min`),
			ref(`${stem}_max`).as(`${stem}_max`),
			sql<number | null>`${sql.ref(`${stem}_sum`)} / nullif(${sql.ref(n)}, 0)`.as(`${stem}_mean`)
		];
	});
	return compiler
		.selectFrom(table)
		.select(['bucket', 'n', 'covered_ms', 'below_ms', ...stats])
		.where('shaft_id', '=', 0)
		.where('bucket', '>=', 0)
		.where('bucket', '<', 0)
		.orderBy('bucket')
		.compile().sql;
}

const statements = new WeakMap<Sqlite, Map<string, Statement>>();

function statement(sqlite: Sqlite, key: string, build: () => string): Statement {
	let byKey = statements.get(sqlite);
	if (!byKey) statements.set(sqlite, (byKey = new Map()));
	let s = byKey.get(key);
	if (!s) byKey.set(key, (s = sqlite.prepare(build()).raw(true)));
	return s;
}

/** The quantities asked for, in a fixed order, flow always first. */
function normalise(fields: readonly Quantity[]): Quantity[] {
	return QUANTITIES.filter((q) => q === 'flow_lpm' || fields.includes(q));
}

/** Raw samples with ts in [from, to); refuses a period longer than RAW_MAX_MS. Quantities left out are null. */
export function readSamples(
	sqlite: Sqlite,
	shaftId: number,
	from: number,
	to: number,
	fields: readonly Quantity[] = QUANTITIES
): HistorySample[] {
	if (to - from > RAW_MAX_MS)
		throw new RangeTooLong(`raw samples are limited to ${RAW_MAX_MS / 3_600_000} h`);
	const want = normalise(fields);
	const rows = statement(sqlite, `samples|${want}`, () => samplesSql(want)).all(
		shaftId,
		from,
		to
	) as (number | null)[][];
	const at = (f: Quantity) => want.indexOf(f) + 1; // column of f, after ts
	const [supply, temp, rpm] = [at('supply_bar'), at('temp_c'), at('shaft_rpm')];
	const out: HistorySample[] = new Array(rows.length);
	for (let i = 0; i < rows.length; i++) {
		const r = rows[i];
		out[i] = {
			ts: r[0] as number,
			flow_lpm: r[1] as number,
			supply_bar: supply ? r[supply] : null,
			temp_c: temp ? r[temp] : null,
			shaft_rpm: rpm ? r[rpm] : null
		};
	}
	return out;
}

const stat = (min: number | null, max: number | null, mean: number | null): Stat | null =>
	min !== null && max !== null && mean !== null ? { min, max, mean } : null;

/**
 * Buckets that overlap [from, to): the one holding `from` is included whole.
 * Quantities left out of `fields` are null.
 */
export function readBuckets(
	sqlite: Sqlite,
	shaftId: number,
	bucket: '1m' | '1h',
	from: number,
	to: number,
	fields: readonly Quantity[] = QUANTITIES
): HistoryBucket[] {
	const table = bucket === '1m' ? 'rollup_1m' : 'rollup_1h';
	const want = normalise(fields);
	const rows = statement(sqlite, `${table}|${want}`, () => bucketsSql(table, want)).all(
		shaftId,
		bucketOf(from, BUCKET_MS[bucket]),
		to
	) as (number | null)[][];
	// columns: bucket, n, covered_ms, below_ms, then min, max, mean of each quantity asked for
	const at = (f: Quantity) => {
		const i = want.indexOf(f);
		return i < 0 ? -1 : 4 + 3 * i;
	};
	const [supply, temp, rpm] = [at('supply_bar'), at('temp_c'), at('shaft_rpm')];
	const out: HistoryBucket[] = new Array(rows.length);
	for (let i = 0; i < rows.length; i++) {
		const r = rows[i];
		out[i] = {
			ts: r[0] as number,
			n: r[1] as number,
			flow_lpm: stat(r[4], r[5], r[6]),
			supply_bar: supply < 0 ? null : stat(r[supply], r[supply + 1], r[supply + 2]),
			temp_c: temp < 0 ? null : stat(r[temp], r[temp + 1], r[temp + 2]),
			shaft_rpm: rpm < 0 ? null : stat(r[rpm], r[rpm + 1], r[rpm + 2]),
			seconds_below_min: (r[3] as number) / 1000,
			covered_s: (r[2] as number) / 1000
		};
	}
	return out;
}
