/**
 * History for charts: raw samples for short periods, 1-minute or 1-hour
 * buckets from the rollups for longer ones. Every read is a range scan of a
 * (shaft_id, ts|bucket) primary key; raw reads are capped at a day.
 *
 * These are the hottest reads of the app (a week is 10 080 buckets), and
 * measured on this machine most of their cost is not SQLite's but handing
 * the values to JavaScript: better-sqlite3 (built for Node 20) makes each
 * result row an array with one V8 API call per value, and the rows were then
 * copied into the answer's objects — about 3.5 µs a bucket, much of it
 * allocation and garbage collection. So no rows come back: each read is one
 * aggregate query whose step, a JavaScript function registered on the
 * connection, receives a row's values as arguments and appends the finished
 * answer object; the statement itself returns NULL. One call per row, no
 * intermediate arrays: a week of buckets in about half the time, a day of
 * raw samples in a third, the same objects. (SQLite building the answer as
 * JSON for one JSON.parse was measured too, and was slower: its number
 * formatting costs more than the crossing it saves.)
 *
 * The statements are built with the typed query builder, compiled once per
 * set of quantities and cached per connection; means are divided in SQL, and
 * a caller that needs only some quantities (the report's flow chart) reads
 * only their columns (the others are passed as NULL). Read-only, so sharing
 * Kysely's connection is safe; reads are synchronous, so one collects at a
 * time.
 */
import { sql } from 'kysely';
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

// ------------------------------------------------ collecting the answer in SQLite's aggregate step

/** the aggregate functions registered on each connection read here (see register) */
const SAMPLE_ROWS = 'aftwater_history_samples';
const BUCKET_ROWS = 'aftwater_history_buckets';

/** the answer of the statement running now, appended to by the step functions */
let collected: (HistorySample | HistoryBucket)[] = [];
let inOrder = true;

function append(row: HistorySample | HistoryBucket) {
	const last = collected.length - 1;
	if (last >= 0 && collected[last].ts >= row.ts) inOrder = false;
	collected.push(row);
}

/** one raw sample: ts, flow, then each other quantity or NULL when it was left out */
function sampleStep(
	_: null,
	ts: number,
	flow_lpm: number,
	supply_bar: number | null,
	temp_c: number | null,
	shaft_rpm: number | null
): void {
	append({ ts, flow_lpm, supply_bar, temp_c, shaft_rpm });
}

const stat = (min: number | null, max: number | null, mean: number | null): Stat | null =>
	min !== null && max !== null && mean !== null ? { min, max, mean } : null;

/** one bucket: bucket, n, covered_ms, below_ms, then min, max, mean of each quantity (NULLs when left out) */
function bucketStep(
	_: null,
	ts: number,
	n: number,
	coveredMs: number,
	belowMs: number,
	flowMin: number | null,
	flowMax: number | null,
	flowMean: number | null,
	supplyMin: number | null,
	supplyMax: number | null,
	supplyMean: number | null,
	tempMin: number | null,
	tempMax: number | null,
	tempMean: number | null,
	rpmMin: number | null,
	rpmMax: number | null,
	rpmMean: number | null
): void {
	append({
		ts,
		n,
		flow_lpm: stat(flowMin, flowMax, flowMean),
		supply_bar: stat(supplyMin, supplyMax, supplyMean),
		temp_c: stat(tempMin, tempMax, tempMean),
		shaft_rpm: stat(rpmMin, rpmMax, rpmMean),
		seconds_below_min: belowMs / 1000,
		covered_s: coveredMs / 1000
	});
}

/**
 * better-sqlite3 takes a step's arity from its length, less the accumulator;
 * its types only know steps of one value
 */
type Step = Parameters<Sqlite['aggregate']>[1]['step'];

function register(sqlite: Sqlite) {
	// directOnly: not callable from a trigger or a view; not deterministic, the step's side effect is its point
	sqlite.aggregate(SAMPLE_ROWS, {
		start: null,
		step: sampleStep as unknown as Step,
		directOnly: true
	});
	sqlite.aggregate(BUCKET_ROWS, {
		start: null,
		step: bucketStep as unknown as Step,
		directOnly: true
	});
}

/**
 * Runs one of the statements below and returns what its steps appended. A
 * range scan of the primary key hands the rows over in key order (no ORDER BY:
 * inside an aggregate it costs a sort); the check in append costs nothing and
 * keeps the order the answer promises whatever plan SQLite picks.
 */
function collect<T extends HistorySample | HistoryBucket>(s: Statement, params: unknown[]): T[] {
	collected = [];
	inOrder = true;
	try {
		s.get(...params);
		const rows = collected as T[];
		return inOrder ? rows : rows.sort((a, b) => a.ts - b.ts);
	} finally {
		collected = [];
	}
}

// ------------------------------------------------ statements

const NULL = sql<null>`null`;

function samplesSql(fields: readonly Quantity[]) {
	const arg = (q: Quantity) => (fields.includes(q) ? sql.ref(q) : NULL);
	const args = [
		sql.ref('ts'),
		sql.ref('flow_lpm'),
		arg('supply_bar'),
		arg('temp_c'),
		arg('shaft_rpm')
	];
	return compiler
		.selectFrom('samples')
		.select(sql<null>`${sql.raw(SAMPLE_ROWS)}(${sql.join(args)})`.as('rows'))
		.where('shaft_id', '=', 0)
		.where('ts', '>=', 0)
		.where('ts', '<', 0)
		.compile().sql;
}

function bucketsSql(table: 'rollup_1m' | 'rollup_1h', fields: readonly Quantity[]) {
	const stats = QUANTITIES.flatMap((q) => {
		if (!fields.includes(q)) return [NULL, NULL, NULL];
		const { stem, n } = STEMS[q];
		return [
			sql.ref(`${stem}_min`),
			sql.ref(`${stem}_max`),
			sql<number | null>`${sql.ref(`${stem}_sum`)} / nullif(${sql.ref(n)}, 0)`
		];
	});
	const args = [
		sql.ref('bucket'),
		sql.ref('n'),
		sql.ref('covered_ms'),
		sql.ref('below_ms'),
		...stats
	];
	return compiler
		.selectFrom(table)
		.select(sql<null>`${sql.raw(BUCKET_ROWS)}(${sql.join(args)})`.as('rows'))
		.where('shaft_id', '=', 0)
		.where('bucket', '>=', 0)
		.where('bucket', '<', 0)
		.compile().sql;
}

const statements = new WeakMap<Sqlite, Map<string, Statement>>();

function statement(sqlite: Sqlite, key: string, build: () => string): Statement {
	let byKey = statements.get(sqlite);
	if (!byKey) {
		register(sqlite);
		statements.set(sqlite, (byKey = new Map()));
	}
	let s = byKey.get(key);
	if (!s) byKey.set(key, (s = sqlite.prepare(build())));
	return s;
}

/** The quantities asked for, in a fixed order, flow always first. */
function normalise(fields: readonly Quantity[]): Quantity[] {
	return QUANTITIES.filter((q) => q === 'flow_lpm' || fields.includes(q));
}

// ------------------------------------------------ reads

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
	return collect(
		statement(sqlite, `samples|${want}`, () => samplesSql(want)),
		[shaftId, from, to]
	);
}

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
	return collect(
		statement(sqlite, `${table}|${want}`, () => bucketsSql(table, want)),
		[shaftId, bucketOf(from, BUCKET_MS[bucket]), to]
	);
}
