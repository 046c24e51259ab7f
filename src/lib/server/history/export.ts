/**
 * CSV exports, streamed. A year at 1 Hz is 31.5 million rows (about 1.5 GB of
 * CSV), so rows are read a page at a time by keyset (ts > the last one sent)
 * only when the client has taken the previous page: the stream's pull() is
 * called when its queue drains, which is backpressure from the socket.
 *
 * Why pages and not one long iterator: Kysely's SQLite driver has a single
 * connection, so .stream() would hold it — and every other query of the app
 * — for the whole download; better-sqlite3's .iterate() on a connection of
 * its own would hold one read snapshot for as long as the slowest client
 * reads, and the WAL cannot be checkpointed past it. Short page queries do
 * neither.
 */
import { sql, type Kysely } from 'kysely';
import type { Statement } from 'better-sqlite3';
import { stringify } from 'csv-stringify/sync';
import { isoWriter } from '$lib/history/iso';
import {
	ALARM_COLUMNS,
	ALARM_VALUE_UNITS,
	BUCKET_COLUMNS,
	SAMPLE_COLUMNS
} from '$lib/history/csv-columns';
import type { Sqlite } from '../db/connection';
import type { Database } from '../db/schema';
import { compiler } from '../ingest/sql-compiler';
import { alarmsIn } from './compliance';

/** rows per page: 10 000 samples is ~0.5 MB of CSV */
export const PAGE_ROWS = 10_000;

const iso = (ms: number | null) => (ms === null ? null : new Date(ms).toISOString());

type Cell = string | number | null;

/**
 * A byte stream of CSV: the header row, then `page(after)` pages until one
 * comes back short. `after` is the key of the last row sent (null first).
 */
function csvStream<K>(
	headers: readonly string[],
	page: (after: K | null) => Promise<{ rows: Cell[][]; last: K | null }>,
	pageRows: number
): ReadableStream<Uint8Array> {
	const encoder = new TextEncoder();
	let after: K | null = null;
	let done = false;
	let started = false;
	return new ReadableStream<Uint8Array>(
		{
			async pull(controller) {
				if (!started) {
					started = true;
					controller.enqueue(encoder.encode(stringify([headers as string[]])));
					return;
				}
				if (done) return;
				const { rows, last } = await page(after);
				if (rows.length) controller.enqueue(encoder.encode(stringify(rows)));
				after = last;
				if (rows.length < pageRows) {
					done = true;
					controller.close();
				}
			}
		},
		// a page or two of CSV waiting for the socket, no more
		new ByteLengthQueuingStrategy({ highWaterMark: 1 << 20 })
	);
}

const samplePage = compiler
	.selectFrom('samples')
	.select(['ts', 'flow_lpm', 'supply_bar', 'temp_c', 'shaft_rpm'])
	.where('shaft_id', '=', 0)
	.where('ts', '>=', 0)
	.where('ts', '<', 0)
	.orderBy('ts')
	.limit(0)
	.compile().sql;

const mean = (sum: string, n: string) =>
	sql<number | null>`${sql.ref(sum)} / nullif(${sql.ref(n)}, 0)`;
const bucketPage = (table: 'rollup_1m' | 'rollup_1h') =>
	compiler
		.selectFrom(table)
		.select([
			'bucket',
			'n',
			'flow_min',
			mean('flow_sum', 'n').as('flow_mean'),
			'flow_max',
			mean('supply_sum', 'supply_n').as('supply_mean'),
			mean('temp_sum', 'temp_n').as('temp_mean'),
			mean('rpm_sum', 'rpm_n').as('rpm_mean'),
			sql<number>`covered_ms / 1000.0`.as('covered_s'),
			sql<number>`below_ms / 1000.0`.as('below_s')
		])
		.where('shaft_id', '=', 0)
		.where('bucket', '>=', 0)
		.where('bucket', '<', 0)
		.orderBy('bucket')
		.limit(0)
		.compile().sql;

// pages come back as arrays, not objects: a month is 2.6 million rows (see samples.ts)
const statements = new WeakMap<Sqlite, Map<string, Statement>>();
function statement(sqlite: Sqlite, text: string): Statement {
	let byText = statements.get(sqlite);
	if (!byText) statements.set(sqlite, (byText = new Map()));
	let s = byText.get(text);
	if (!s) byText.set(text, (s = sqlite.prepare(text).raw(true)));
	return s;
}

/**
 * Pages of a keyset over an integer key in the first column: [from, to),
 * each page starting after the last key sent, the key written as ISO 8601.
 */
function keysetCsv(
	sqlite: Sqlite,
	text: string,
	headers: readonly string[],
	shaftId: number,
	from: number,
	to: number,
	pageRows: number
) {
	const stmt = statement(sqlite, text);
	const fast = isoWriter();
	return csvStream<number>(
		headers,
		async (after) => {
			const rows = stmt.all(shaftId, after === null ? from : after + 1, to, pageRows) as Cell[][];
			const last = rows.length ? (rows[rows.length - 1][0] as number) : after;
			for (const r of rows) r[0] = fast(r[0] as number);
			return { rows, last };
		},
		pageRows
	);
}

/** Raw samples with ts in [from, to), in SI units as stored. */
export function samplesCsv(
	sqlite: Sqlite,
	shaftId: number,
	from: number,
	to: number,
	pageRows = PAGE_ROWS
) {
	return keysetCsv(
		sqlite,
		samplePage,
		SAMPLE_COLUMNS.map((c) => c.header),
		shaftId,
		from,
		to,
		pageRows
	);
}

/** 1-minute or 1-hour buckets overlapping [from, to). */
export function bucketsCsv(
	sqlite: Sqlite,
	shaftId: number,
	bucket: '1m' | '1h',
	from: number,
	to: number,
	pageRows = PAGE_ROWS
) {
	const size = bucket === '1m' ? 60_000 : 3_600_000;
	const text = bucketPage(bucket === '1m' ? 'rollup_1m' : 'rollup_1h');
	return keysetCsv(
		sqlite,
		text,
		BUCKET_COLUMNS.map((c) => c.header),
		shaftId,
		Math.floor(from / size) * size,
		to,
		pageRows
	);
}

/** The shaft's alarms and its separator's that overlap [from, to): one row per instance. */
export function alarmsCsv(
	db: Kysely<Database>,
	vesselId: number,
	shaftId: number,
	from: number,
	to: number,
	now = Date.now()
) {
	return csvStream<true>(
		ALARM_COLUMNS.map((c) => c.header),
		async () => {
			// a shaft has hundreds of alarm instances a year, not millions: one page
			const alarms = await alarmsIn(db, vesselId, shaftId, from, to);
			const acks = alarms.length
				? await db
						.selectFrom('alarms')
						.select(['id', 'acknowledged_at', 'acknowledged_by'])
						.where(
							'id',
							'in',
							alarms.map((a) => a.id)
						)
						.execute()
				: [];
			const ack = new Map(acks.map((a) => [a.id, a]));
			return {
				rows: alarms.map((a) => [
					a.id,
					a.shaft_id === null ? 'separator' : 'shaft',
					a.type,
					a.priority,
					iso(a.raised_at),
					iso(a.ended_at),
					a.ended_at === null
						? Math.max(0, now - a.raised_at) / 1000
						: (a.ended_at - a.raised_at) / 1000,
					a.state,
					a.value,
					a.limit_value,
					ALARM_VALUE_UNITS[a.type] ?? '',
					iso(ack.get(a.id)?.acknowledged_at ?? null),
					// an e-mail address cannot start a spreadsheet formula, but be sure
					(ack.get(a.id)?.acknowledged_by ?? '').replace(/^[=+\-@]/, "'$&")
				]),
				last: true
			};
		},
		Number.MAX_SAFE_INTEGER
	);
}

/** A file name that says what the export holds: vessel, shaft, kind and UTC period. */
export function exportFilename(
	vesselCode: string,
	shaftCode: string,
	kind: string,
	from: number,
	to: number
) {
	const stamp = (ms: number) => new Date(ms).toISOString().slice(0, 16).replace(/[-:]/g, '');
	return `${vesselCode}_${shaftCode}_${kind}_${stamp(from)}Z_${stamp(to)}Z.csv`;
}
