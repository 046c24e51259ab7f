/**
 * bench:history — one year of 1 Hz samples for one shaft (about 31.5 million
 * rows) in a fresh SQLite file, then the history reads the app makes, timed
 * through the app's own query functions:
 *
 *   a day, a week, a month in 1-minute buckets; a month and a year in 1-hour
 *   buckets; a day of raw samples; the compliance of a year; the CSV export
 *   of a month, with the memory it takes while streaming.
 *
 * Samples and rollups are generated in bulk with the definitions of
 * src/lib/compliance.ts (sample-hold, gaps over the stale threshold unknown,
 * intervals split across buckets) and a few windows are checked against the
 * real TelemetryWriter. Run: npm run bench:history [-- --reuse] [--keep]
 * (--reuse keeps a previous run's file, --keep leaves the file behind,
 * --days=N builds N days instead of 365 to try it out).
 */
import { constantMinimum } from '$lib/minimums';
import { existsSync, rmSync, statSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import v8 from 'node:v8';
import vm from 'node:vm';
import { join } from 'node:path';
import {
	bucketOf,
	coverageFromPoints,
	heldInterval,
	HOUR_MS,
	MINUTE_MS,
	splitInterval
} from '$lib/compliance';
import { createKysely, openSqlite, type Sqlite } from '$lib/server/db/connection';
import { fileMigrations, migrateToLatest } from '$lib/server/db/migrate';
import { TelemetryWriter } from '$lib/server/ingest/telemetry-writer';
import { SAMPLE_STRIDE } from '$lib/server/ingest/batch';
import { readBuckets, readSamples } from '$lib/server/history/samples';
import { coverageOf, shaftCompliance } from '$lib/server/history/compliance';
import { samplesCsv } from '$lib/server/history/export';

const args = new Set(process.argv.slice(2));
const PATH = join(tmpdir(), 'aftwater-bench-history.db');
const DAY = 86_400_000;
const START = Date.UTC(2025, 0, 1); // a fixed year, so every run builds the same data
/** --days=N builds a shorter history to try the bench out; the targets are for the full year */
const DAYS = Number([...args].find((a) => a.startsWith('--days='))?.slice(7) ?? 365);
const END = START + DAYS * DAY;
const SHAFT = 1;
const CHECK_SHAFT = 2;
const MIN_FLOW = 0.15 * 420; // L/min: a 420 mm shaft at 0.15 L/min per mm
const GAP_MS = 30_000; // the default stale threshold
const TARGETS = { day_1m_ms: 25, week_1m_ms: 25, year_1h_ms: 40, compliance_year_ms: 100 };

const log = (...a: unknown[]) => console.log('[bench:history]', ...a);

// a collector to call between timed runs (so one query does not pay for the garbage of the
// last) and to see what the export keeps alive, without asking for node --expose-gc
v8.setFlagsFromString('--expose-gc');
const gc = vm.runInNewContext('gc') as () => void;

// ---------------------------------------------------------------- the data

/** Deterministic noise (a 32-bit LCG), so each run writes the same year. */
let seed = 20250101;
const rand = () => (seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 2 ** 32;

/**
 * The shaft's year: 1 Hz with a few ms of jitter; a 20-minute gateway outage
 * every week (unknown time); a 5-minute dip below the minimum every day; the
 * shaft stopped in port two hours a day.
 */
function* year(): Generator<[number, number, number, number | null, number]> {
	for (let t = START; t < END; t += 1000) {
		const sinceWeek = (t - START) % (7 * DAY);
		if (sinceWeek >= 3 * DAY && sinceWeek < 3 * DAY + 20 * MINUTE_MS) continue; // outage
		const inDay = (t - START) % DAY;
		const dip = inDay >= 14 * HOUR_MS && inDay < 14 * HOUR_MS + 5 * MINUTE_MS;
		const port = inDay >= 3 * HOUR_MS && inDay < 5 * HOUR_MS;
		const flow =
			MIN_FLOW * (dip ? 0.8 : 1.3 + 0.08 * Math.sin(inDay / 600_000)) + (rand() - 0.5) * 0.4;
		const supply = 1.2 + (rand() - 0.5) * 0.02;
		const temp = rand() < 0.9 ? 10 + 5 * Math.sin(((t - START) / (365 * DAY)) * 2 * Math.PI) : null; // 10 % unreported
		const rpm = port ? 0 : 110;
		yield [
			t + Math.floor(rand() * 20),
			Math.round(flow * 1000) / 1000,
			Math.round(supply * 10_000) / 10_000,
			temp === null ? null : Math.round(temp * 100) / 100,
			rpm
		];
	}
}

interface Acc {
	bucket: number;
	n: number;
	fmin: number | null;
	fminAt: number | null;
	fmax: number | null;
	fsum: number;
	s: [number, number | null, number | null, number];
	te: [number, number | null, number | null, number];
	r: [number, number | null, number | null, number];
	covered: number;
	below: number;
}
const acc = (bucket: number): Acc => ({
	bucket,
	n: 0,
	fmin: null,
	fminAt: null,
	fmax: null,
	fsum: 0,
	s: [0, null, null, 0],
	te: [0, null, null, 0],
	r: [0, null, null, 0],
	covered: 0,
	below: 0
});
function addStat(st: [number, number | null, number | null, number], v: number | null) {
	if (v === null) return;
	st[0]++;
	st[1] = st[1] === null || v < st[1] ? v : st[1];
	st[2] = st[2] === null || v > st[2] ? v : st[2];
	st[3] += v;
}
const rollupRow = (shaft: number, a: Acc) => [
	shaft,
	a.bucket,
	a.n,
	a.fmin,
	a.fminAt,
	a.fmax,
	a.fsum,
	a.s[0],
	a.s[1],
	a.s[2],
	a.s[3],
	a.te[0],
	a.te[1],
	a.te[2],
	a.te[3],
	a.r[0],
	a.r[1],
	a.r[2],
	a.r[3],
	a.covered,
	a.below
];
const ROLLUP_COLS =
	'shaft_id, bucket, n, flow_min, flow_min_at, flow_max, flow_sum, supply_n, supply_min, supply_max, supply_sum, temp_n, temp_min, temp_max, temp_sum, rpm_n, rpm_min, rpm_max, rpm_sum, covered_ms, below_ms';

/** Multi-row INSERTs of `width` columns, `rows` at a time, from one reused parameter array. */
function bulkInserter(sqlite: Sqlite, table: string, cols: string, width: number, rows: number) {
	const one = `(${Array(width).fill('?').join(',')})`;
	const full = sqlite.prepare(
		`insert into ${table} (${cols}) values ${Array(rows).fill(one).join(',')}`
	);
	const params: unknown[] = new Array(width * rows);
	let k = 0;
	return {
		push(values: unknown[]) {
			for (let i = 0; i < width; i++) params[k++] = values[i];
			if (k === params.length) {
				full.run(params);
				k = 0;
			}
		},
		flush() {
			const left = k / width;
			if (left)
				sqlite
					.prepare(`insert into ${table} (${cols}) values ${Array(left).fill(one).join(',')}`)
					.run(params.slice(0, k));
			k = 0;
		}
	};
}

function generate(sqlite: Sqlite) {
	const started = performance.now();
	sqlite.pragma('synchronous = OFF'); // a bench file: a crash while loading just means running again
	sqlite.pragma('cache_size = -262144'); // 256 MB
	const samples = bulkInserter(
		sqlite,
		'samples',
		'shaft_id, ts, flow_lpm, supply_bar, temp_c, shaft_rpm',
		6,
		150
	);
	const minutes = bulkInserter(sqlite, 'rollup_1m', ROLLUP_COLS, 21, 40);
	const hours = bulkInserter(sqlite, 'rollup_1h', ROLLUP_COLS, 21, 40);
	const open: [Map<number, Acc>, number, ReturnType<typeof bulkInserter>][] = [
		[new Map(), MINUTE_MS, minutes],
		[new Map(), HOUR_MS, hours]
	];
	const get = (map: Map<number, Acc>, b: number) => map.get(b) ?? map.set(b, acc(b)).get(b)!;
	let prev: { ts: number; below: boolean } | null = null;
	let count = 0;
	const row: unknown[] = [SHAFT, 0, 0, 0, 0, 0];
	const begin = sqlite.prepare('begin');
	const commit = sqlite.prepare('commit');
	begin.run();
	for (const [ts, flow, supply, temp, rpm] of year()) {
		row[1] = ts;
		row[2] = flow;
		row[3] = supply;
		row[4] = temp;
		row[5] = rpm;
		samples.push(row);
		for (const [map, size, ins] of open) {
			const a = get(map, bucketOf(ts, size));
			a.n++;
			a.fsum += flow;
			if (a.fmin === null || flow < a.fmin) {
				a.fmin = flow;
				a.fminAt = ts;
			}
			a.fmax = a.fmax === null || flow > a.fmax ? flow : a.fmax;
			addStat(a.s, supply);
			addStat(a.te, temp);
			addStat(a.r, rpm);
			// the same rule as the writer: the previous sample holds until this one, if the gap is within the threshold
			const held = prev && heldInterval(prev.ts, ts, GAP_MS);
			if (held) {
				const wasBelow = prev!.below;
				splitInterval(held[0], held[1], size, (b, ms) => {
					const q = get(map, b);
					q.covered += ms;
					if (wasBelow) q.below += ms;
				});
			}
			// every later interval starts at or after ts: buckets ending by then are final
			for (const [b, q] of map) {
				if (b + size > ts) break;
				ins.push(rollupRow(SHAFT, q));
				map.delete(b);
			}
		}
		prev = { ts, below: flow < MIN_FLOW };
		if (++count % 500_000 === 0) {
			commit.run();
			begin.run();
			if (count % 5_000_000 === 0)
				log(
					`${(count / 1e6).toFixed(0)} M samples, ${((performance.now() - started) / 1000).toFixed(0)} s`
				);
		}
	}
	for (const [map, , ins] of open) for (const q of map.values()) ins.push(rollupRow(SHAFT, q));
	samples.flush();
	minutes.flush();
	hours.flush();
	commit.run();
	sqlite.pragma('synchronous = NORMAL');
	sqlite.pragma('wal_checkpoint(TRUNCATE)');
	return { count, seconds: (performance.now() - started) / 1000 };
}

// ---------------------------------------------------------------- checks

/** Feeds windows of shaft 1's samples through the real writer as shaft 2, and compares the rollups. */
function checkAgainstWriter(sqlite: Sqlite): string[] {
	const writer = new TelemetryWriter(sqlite);
	// one shaft per window, so each window is the newest data of its shaft, as live ingest writes it
	writer.configure([0, 1, 2].map((i) => [CHECK_SHAFT + i, constantMinimum(MIN_FLOW), GAP_MS]));
	const windows = [
		START + 14 * HOUR_MS - 30 * MINUTE_MS + 40 * DAY, // across a daily dip
		START + 3 * DAY + 35 * DAY - 30 * MINUTE_MS, // across a weekly outage (day 3 of week 5)
		START + 200 * DAY + 7 * HOUR_MS // an ordinary morning
	]
		.map((w) => bucketOf(w, HOUR_MS))
		.filter((w) => w + 3 * HOUR_MS < END);
	const cols =
		'bucket, n, flow_min, flow_min_at, flow_max, flow_sum, supply_n, supply_min, supply_max, supply_sum, temp_n, temp_min, temp_max, temp_sum, rpm_n, rpm_min, rpm_max, rpm_sum, covered_ms, below_ms';
	const rows = (table: string, shaft: number, a: number, b: number) =>
		sqlite
			.prepare(
				`select ${cols} from ${table} where shaft_id = ? and bucket >= ? and bucket < ? order by bucket`
			)
			.all(shaft, a, b) as Record<string, number | null>[];
	const failures: string[] = [];
	let seq = 0;
	for (const [i, w] of windows.entries()) {
		const check = CHECK_SHAFT + i;
		const raw = sqlite
			.prepare(
				'select ts, flow_lpm, supply_bar, temp_c, shaft_rpm from samples where shaft_id = ? and ts >= ? and ts < ? order by ts'
			)
			.all(SHAFT, w - MINUTE_MS, w + 2 * HOUR_MS + MINUTE_MS) as {
			ts: number;
			flow_lpm: number;
			supply_bar: number | null;
			temp_c: number | null;
			shaft_rpm: number | null;
		}[];
		const batch = new Float64Array(raw.length * SAMPLE_STRIDE);
		raw.forEach((r, k) =>
			batch.set(
				[check, r.ts, r.flow_lpm, r.supply_bar ?? NaN, r.temp_c ?? NaN, r.shaft_rpm ?? NaN],
				k * SAMPLE_STRIDE
			)
		);
		writer.write({
			seq: ++seq,
			samples: batch,
			states: new Float64Array(0),
			valves: [],
			statuses: [],
			rejected: [],
			lastMessageAt: []
		});
		for (const [table, a, b] of [
			['rollup_1m', w, w + 2 * HOUR_MS],
			['rollup_1h', w, w + 2 * HOUR_MS]
		] as const) {
			const mine = rows(table, SHAFT, a, b);
			const theirs = rows(table, check, a, b);
			if (mine.length !== theirs.length)
				failures.push(
					`${table} @${new Date(w).toISOString()}: ${mine.length} rows generated, ${theirs.length} by the writer`
				);
			mine.forEach((m, i) => {
				for (const [k, v] of Object.entries(m)) {
					const u = theirs[i]?.[k];
					const same =
						v === u ||
						(typeof v === 'number' &&
							typeof u === 'number' &&
							Math.abs(v - u) <= 1e-9 * Math.max(1, Math.abs(v)));
					if (!same)
						failures.push(
							`${table} ${new Date(m.bucket as number).toISOString()} ${k}: generated ${v}, writer ${u}`
						);
				}
			});
		}
	}
	for (const t of ['rollup_1m', 'rollup_1h', 'samples'])
		sqlite.prepare(`delete from ${t} where shaft_id >= ?`).run(CHECK_SHAFT);
	return failures;
}

// ---------------------------------------------------------------- timing

async function time<T>(
	runs: number,
	fn: () => Promise<T>
): Promise<{ median: number; p95: number; result: T }> {
	let result = await fn();
	await fn(); // warm the page cache and the statement cache
	const ms: number[] = [];
	for (let i = 0; i < runs; i++) {
		gc();
		const t = performance.now();
		result = await fn();
		ms.push(performance.now() - t);
	}
	ms.sort((a, b) => a - b);
	return {
		median: ms[Math.floor(ms.length / 2)],
		p95: ms[Math.min(ms.length - 1, Math.ceil(ms.length * 0.95) - 1)],
		result
	};
}

async function main() {
	const reuse = args.has('--reuse') && existsSync(PATH);
	if (!reuse) for (const f of [PATH, `${PATH}-wal`, `${PATH}-shm`]) rmSync(f, { force: true });
	const sqlite = openSqlite(PATH);
	const db = createKysely(sqlite);
	await migrateToLatest(db, await fileMigrations());
	let generated = { count: 0, seconds: 0 };
	if (!reuse || !sqlite.prepare('select 1 from samples where shaft_id = ? limit 1').get(SHAFT)) {
		const now = Date.now();
		sqlite
			.prepare(
				"insert into vessels (id, code, name, time_zone, created_at) values (1, 'bench-vessel', 'Bench Vessel', 'UTC', ?)"
			)
			.run(now);
		sqlite
			.prepare(
				"insert into shafts (id, vessel_id, code, name, diameter_mm, created_at) values (?, 1, 'main', 'Main shaft', 420, ?)"
			)
			.run(SHAFT, now);
		log(`generating a year of 1 Hz samples into ${PATH} …`);
		generated = generate(sqlite);
		log(
			`${generated.count.toLocaleString('en')} samples with rollups in ${generated.seconds.toFixed(1)} s (${Math.round(generated.count / generated.seconds).toLocaleString('en')} rows/s)`
		);
	} else {
		generated.count = (
			sqlite.prepare('select count(*) as n from samples where shaft_id = ?').get(SHAFT) as {
				n: number;
			}
		).n;
		log(`reusing ${PATH} (${generated.count.toLocaleString('en')} samples)`);
	}
	for (let i = 0; i < 3; i++) {
		sqlite
			.prepare(
				"insert or ignore into shafts (id, vessel_id, code, name, diameter_mm, created_at) values (?, 1, ?, 'Writer check', 420, ?)"
			)
			.run(CHECK_SHAFT + i, `check-${i}`, Date.now());
	}
	const failures = checkAgainstWriter(sqlite);
	log(
		failures.length
			? `rollups differ from the writer's:\n  ${failures.slice(0, 10).join('\n  ')}`
			: 'generated rollups equal the writer’s in 3 windows (minutes and hours)'
	);

	// a raw-based check of the compliance the bench times: one day, unaligned
	const dayFrom = START + Math.min(100, DAYS - 2) * DAY + 12_345;
	const dayRaw = (
		sqlite
			.prepare(
				'select ts, flow_lpm from samples where shaft_id = ? and ts >= ? and ts < ? order by ts'
			)
			.all(SHAFT, dayFrom - MINUTE_MS, dayFrom + DAY + MINUTE_MS) as {
			ts: number;
			flow_lpm: number;
		}[]
	).map((r) => ({ ts: r.ts, below: r.flow_lpm < MIN_FLOW }));
	const want = coverageFromPoints(dayRaw, dayFrom, dayFrom + DAY, GAP_MS);
	const got = await coverageOf(db, SHAFT, dayFrom, dayFrom + DAY, GAP_MS, constantMinimum(MIN_FLOW));
	const complianceAgrees = got.covered_ms === want.covered_ms && got.below_ms === want.below_ms;
	log(
		`compliance of a day from rollups ${complianceAgrees ? 'equals' : 'DIFFERS FROM'} the raw-based figure (${got.covered_ms} / ${got.below_ms} ms vs ${want.covered_ms} / ${want.below_ms})`
	);

	const RUNS = 15;
	const at = START + Math.min(180, Math.floor(DAYS / 2)) * DAY; // mid-year
	const results: Record<string, { median: number; p95: number; rows: number }> = {};
	const run = async (
		key: string,
		what: string,
		fn: () => Promise<
			unknown[] | { read: { hour_rows: number; minute_rows: number; raw_rows: number } }
		>
	) => {
		const t = await time(RUNS, fn as () => Promise<unknown>);
		const r = t.result as
			unknown[] | { read: { hour_rows: number; minute_rows: number; raw_rows: number } };
		const rows = Array.isArray(r)
			? r.length
			: r.read.hour_rows + r.read.minute_rows + r.read.raw_rows;
		results[key] = { median: t.median, p95: t.p95, rows };
		console.log(
			`  ${what.padEnd(44)} ${t.median.toFixed(2).padStart(8)} ms  p95 ${t.p95.toFixed(2).padStart(8)} ms  ${String(rows).padStart(7)} rows`
		);
	};
	// the machine is shared: say how busy it was, so the figures can be judged
	const load = loadavg().map((l) => Math.round(l * 100) / 100);
	console.log(
		`\n  load average ${load.join(' ')} on ${(await import('node:os')).cpus().length} cores`
	);
	console.log(
		`  query (median of ${RUNS}, after 2 warm-up runs)`.padEnd(48) +
			'    median          p95     rows read'
	);
	await run('day_1m_ms', 'a day in 1-minute buckets', async () =>
		readBuckets(sqlite, SHAFT, '1m', at, at + DAY)
	);
	await run('week_1m_ms', 'a week in 1-minute buckets', async () =>
		readBuckets(sqlite, SHAFT, '1m', at, at + 7 * DAY)
	);
	await run('week_1m_flow_ms', 'a week in 1-minute buckets, flow only', async () =>
		readBuckets(sqlite, SHAFT, '1m', at, at + 7 * DAY, ['flow_lpm'])
	);
	await run('month_1m_ms', 'a month in 1-minute buckets', async () =>
		readBuckets(sqlite, SHAFT, '1m', at, at + 30 * DAY)
	);
	await run('month_1h_ms', 'a month in 1-hour buckets', async () =>
		readBuckets(sqlite, SHAFT, '1h', at, at + 30 * DAY)
	);
	await run('year_1h_ms', 'a year in 1-hour buckets', async () =>
		readBuckets(sqlite, SHAFT, '1h', START, END)
	);
	await run('day_raw_ms', 'a day of raw samples (the raw cap)', async () =>
		readSamples(sqlite, SHAFT, at, at + DAY)
	);
	const yFrom = START + 12_345; // unaligned ends: raw edges, minutes and hours all read
	const yTo = END - 23_456;
	await run('compliance_year_ms', 'compliance of a year (unaligned ends)', () =>
		shaftCompliance(db, {
			shaftId: SHAFT,
			vesselId: 1,
			from: yFrom,
			to: yTo,
			now: Date.now(),
			gapMs: GAP_MS,
			minimums: constantMinimum(MIN_FLOW)
		})
	);
	const yearly = await shaftCompliance(db, {
		shaftId: SHAFT,
		vesselId: 1,
		from: yFrom,
		to: yTo,
		now: Date.now(),
		gapMs: GAP_MS,
		minimums: constantMinimum(MIN_FLOW)
	});
	console.log(
		`  (the year: ${(yearly.share_at_or_above_min * 100).toFixed(3)} % at or above the minimum, ${(yearly.share_below_min * 100).toFixed(3)} % below, ${(yearly.share_unknown * 100).toFixed(3)} % unknown)`
	);

	// the export of a month, streamed; every 20 chunks the heap is collected and read, so the
	// figure is what the export keeps alive, not garbage waiting for the collector
	gc();
	const heapBefore = process.memoryUsage().heapUsed;
	let heapPeak = heapBefore;
	let rssPeak = process.memoryUsage().rss;
	const exportStarted = performance.now();
	const reader = samplesCsv(sqlite, SHAFT, at, at + 30 * DAY).getReader();
	let bytes = 0;
	let chunks = 0;
	let lines = 0;
	for (;;) {
		const { done, value } = await reader.read();
		if (done) break;
		bytes += value.byteLength;
		chunks++;
		for (let i = 0; i < value.length; i++) if (value[i] === 10) lines++;
		if (chunks % 20 === 0) {
			gc();
			const m = process.memoryUsage();
			heapPeak = Math.max(heapPeak, m.heapUsed);
			rssPeak = Math.max(rssPeak, m.rss);
		}
	}
	const exportSeconds = (performance.now() - exportStarted) / 1000;
	const heapGrowth = heapPeak - heapBefore;
	const streams = heapGrowth < bytes / 20;
	console.log(
		`  CSV export of a month: ${(lines - 1).toLocaleString('en')} rows, ${(bytes / 1e6).toFixed(1)} MB in ${chunks} chunks, ${exportSeconds.toFixed(1)} s (${(bytes / 1e6 / exportSeconds).toFixed(1)} MB/s); ` +
			`heap kept alive while streaming ${(heapGrowth / 1e6).toFixed(1)} MB (${((heapGrowth / bytes) * 100).toFixed(1)} % of the output) — ${streams ? 'streamed' : 'HELD IN MEMORY'}`
	);

	const pass =
		failures.length === 0 &&
		complianceAgrees &&
		streams &&
		results.day_1m_ms.median < TARGETS.day_1m_ms &&
		results.week_1m_ms.median < TARGETS.week_1m_ms &&
		results.year_1h_ms.median < TARGETS.year_1h_ms &&
		results.compliance_year_ms.median < TARGETS.compliance_year_ms;
	console.log(
		`\n  targets: day/week in 1-minute buckets < 25 ms, year in 1-hour buckets < 40 ms, yearly compliance < 100 ms, export streams → ${pass ? 'PASS' : 'FAIL'}`
	);
	console.log(
		JSON.stringify({
			bench: 'history',
			samples: generated.count,
			load_average: load,
			file_mb: Math.round(statSync(PATH).size / 1e6),
			generate_s: Math.round(generated.seconds * 10) / 10,
			writer_check_failures: failures.length,
			compliance_matches_raw: complianceAgrees,
			...Object.fromEntries(
				Object.entries(results).map(([k, v]) => [k, Math.round(v.median * 100) / 100])
			),
			export_month: {
				rows: lines - 1,
				mb: Math.round(bytes / 1e5) / 10,
				seconds: Math.round(exportSeconds * 10) / 10,
				peak_heap_growth_mb: Math.round(heapGrowth / 1e5) / 10,
				rss_peak_mb: Math.round(rssPeak / 1e6)
			},
			targets: TARGETS,
			pass
		})
	);
	await db.destroy();
	if (!args.has('--keep') && !args.has('--reuse'))
		for (const f of [PATH, `${PATH}-wal`, `${PATH}-shm`]) rmSync(f, { force: true });
	process.exitCode = pass ? 0 : 1;
}

await main();
