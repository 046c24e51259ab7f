/**
 * Compliance from the real database: samples ingested through the pipeline
 * (so the writer builds the rollups), alarms and purge commands inserted
 * directly (nothing writes purge commands yet, and the alarm rules are off
 * here so only the hand-made alarms count). The hand-worked examples carry
 * their arithmetic; the last test proves rollup-based == raw-based.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { constantMinimum } from '$lib/minimums';
import { SYSTEM } from '$lib/server/audit';
import { updateShaft } from '$lib/server/fleet/service';
import { shaftIds, startTestApp, type TestApp } from './helpers/app';
import { coverageFromPoints, HOUR_MS, MINUTE_MS, sharesOf } from '$lib/compliance';
import { coverageOf, shaftCompliance } from '$lib/server/history/compliance';
import { readBuckets, readSamples } from '$lib/server/history/samples';
import { shaftHistory, type ShaftHistory } from '$lib/server/history/shaft-context';
import type { AlarmType, Priority } from '$lib/alarms/types';

let app: TestApp;
let port: ShaftHistory; // corrin-bay port: 420 mm × 0.15 L/min/mm = 63 L/min
let main: ShaftHistory; // hallow-tern main: 600 mm × 0.15 = 90 L/min
/** an hour boundary three days ago: every example lives in its own hours after it */
let T: number;

const pipeline = () => app.ctx.services.telemetry!.pipeline;

async function shaft(vessel: string, code: string) {
	return (await shaftHistory(app.ctx, (await shaftIds(app.ctx, vessel, code)).shaftId))!;
}

async function ingest(h: ShaftHistory, rows: { ts: number; flow_lpm: number }[]) {
	for (const r of rows) pipeline().handle(h.topic, Buffer.from(JSON.stringify(r)));
	await pipeline().drain();
}

/** 1 Hz samples over [a, b] inclusive, flow from `flow(ts)`. */
const everySecond = (a: number, b: number, flow: (ts: number) => number) => {
	const out: { ts: number; flow_lpm: number }[] = [];
	for (let t = a; t <= b; t += 1000) out.push({ ts: t, flow_lpm: flow(t) });
	return out;
};

const compliance = (h: ShaftHistory, from: number, to: number) =>
	shaftCompliance(app.ctx.db, {
		shaftId: h.shaft.id,
		vesselId: h.vessel.id,
		from,
		to,
		now: Date.now(),
		gapMs: h.gapMs,
		minimums: h.minimums,
		items: true
	});

beforeAll(async () => {
	app = await startTestApp({ ALARM_RULES: '0' });
	port = await shaft('corrin-bay', 'port');
	main = await shaft('hallow-tern', 'main');
	T = Math.floor((Date.now() - 3 * 86_400_000) / HOUR_MS) * HOUR_MS;
});
afterAll(() => app?.stop());

describe('hand-worked compliance', () => {
	it('the shaft figures the examples rely on', () => {
		expect(port.minFlowLpm).toBeCloseTo(63, 9); // 420 mm × 0.15 L/min per mm
		expect(port.gapMs).toBe(30_000); // the default stale threshold, 30 s
	});

	it('constant flow above the minimum: all of the period compliant', async () => {
		// hours T … T+2h at 1 Hz, 100 L/min (> 63)
		await ingest(
			port,
			everySecond(T - 60_000, T + 2 * HOUR_MS + 60_000, () => 100)
		);
		// an unaligned period, 00:10:30 to 01:10:15: raw edges, minutes and a whole hour all used
		const from = T + 10.5 * MINUTE_MS;
		const to = T + 70.25 * MINUTE_MS;
		const c = await compliance(port, from, to);
		// 59 min 45 s = 3585 s, every second held by a sample 1 s before the next: covered 3585 s, none below
		expect(c.period_s).toBe(3585);
		expect(c.share_at_or_above_min).toBe(1);
		expect(c.share_unknown).toBe(0);
		expect(c.seconds_below_min).toBe(0);
		// every sample is 100: the lowest is 100, first seen at the first sample of the period
		expect(c.min_flow_lpm_observed).toBe(100);
		expect(c.min_flow_at).toBe(from);
		// 00:10:30–00:11 and 01:10–01:10:15 from raw, 00:11–01:00 and 01:00–01:10 from minutes, no whole hour
		expect(c.read.hour_rows).toBe(0);
		expect(c.read.minute_rows).toBe(49 + 10);
		// 30 raw samples + 1 before + 1 after; 15 + 1 before + 1 after
		expect(c.read.raw_rows).toBe(32 + 17);
	});

	it('a known dip below the minimum', async () => {
		// hour T+3h … T+4h at 100 L/min, except 50 L/min (< 63) for samples in [T+3h20m, T+3h25m)
		const h0 = T + 3 * HOUR_MS;
		const dipFrom = h0 + 20 * MINUTE_MS;
		const dipTo = h0 + 25 * MINUTE_MS;
		await ingest(
			port,
			everySecond(h0 - 60_000, h0 + HOUR_MS + 60_000, (t) => (t >= dipFrom && t < dipTo ? 50 : 100))
		);
		const c = await compliance(port, h0, h0 + HOUR_MS);
		// 300 samples at 50 L/min, each holding 1 s: 300 s below; the rest of the 3600 s at or above
		expect(c.seconds_below_min).toBe(300);
		expect(c.share_below_min).toBeCloseTo(300 / 3600, 12);
		expect(c.share_at_or_above_min).toBeCloseTo(3300 / 3600, 12);
		expect(c.share_unknown).toBe(0);
		expect(c.min_flow_lpm_observed).toBe(50);
		expect(c.min_flow_at).toBe(dipFrom);
		// an hour-aligned hour is one rollup_1h row and nothing else
		expect(c.read).toEqual({ hour_rows: 1, minute_rows: 0, raw_rows: 0 });
	});

	it('a gap longer than the stale threshold counts as unknown, never as compliant', async () => {
		const h0 = T + 6 * HOUR_MS;
		// 1 Hz 00:00–00:10, nothing until 00:13, 1 Hz again to 00:20 — except a 30 s hole 00:15:00–00:15:30
		const rows = [
			...everySecond(h0 - 5000, h0 + 10 * MINUTE_MS, () => 100),
			...everySecond(h0 + 13 * MINUTE_MS, h0 + 15 * MINUTE_MS, () => 100),
			...everySecond(h0 + 15 * MINUTE_MS + 30_000, h0 + 20 * MINUTE_MS + 5000, () => 100)
		];
		await ingest(port, rows);
		const c = await compliance(port, h0, h0 + 20 * MINUTE_MS);
		// 00:10 → 00:13 is 180 s > 30 s: unknown. 00:15:00 → 00:15:30 is exactly 30 s: still held (≤ threshold)
		// period 1200 s: 180 s unknown = 0.15, 1020 s at or above = 0.85
		expect(c.seconds_unknown).toBe(180);
		expect(c.share_unknown).toBeCloseTo(0.15, 12);
		expect(c.share_at_or_above_min).toBeCloseTo(0.85, 12);
		expect(c.seconds_below_min).toBe(0);
	});

	it('a period that starts inside an alarm; alarms by type and priority; purges by outcome', async () => {
		const h0 = T + 8 * HOUR_MS;
		await ingest(
			port,
			everySecond(h0 - 60_000, h0 + HOUR_MS + 60_000, () => 100)
		);
		const alarm = (
			type: AlarmType,
			priority: Priority,
			raised: number,
			ended: number | null,
			shaftId: number | null = port.shaft.id
		) =>
			app.ctx.db
				.insertInto('alarms')
				.values({
					vessel_id: port.vessel.id,
					shaft_id: shaftId,
					type,
					priority,
					state: ended === null ? 'unacknowledged' : 'normal',
					active: ended === null ? 1 : 0,
					acknowledged: ended === null ? 0 : 1,
					raised_at: raised,
					ended_at: ended,
					suppressed: 0,
					out_of_service: 0,
					updated_at: raised
				})
				.execute();
		// raised 10 min before the period, ended 5 min into it: 300 s inside, not counted as raised in it
		await alarm('low_flow', 'alarm', h0 - 10 * MINUTE_MS, h0 + 5 * MINUTE_MS);
		// inside: 00:30–00:32 low-flow margin warning (120 s); the separator's ΔP warning 00:40–00:50 (600 s)
		await alarm('low_flow_margin', 'warning', h0 + 30 * MINUTE_MS, h0 + 32 * MINUTE_MS);
		await alarm('separator_dp_high', 'warning', h0 + 40 * MINUTE_MS, h0 + 50 * MINUTE_MS, null);
		// another shaft's alarm is not this shaft's
		const stbd = await shaft('corrin-bay', 'stbd');
		await alarm('low_flow', 'alarm', h0 + 10 * MINUTE_MS, h0 + 20 * MINUTE_MS, stbd.shaft.id);

		const purge = (
			id: string,
			at: number,
			source: 'schedule' | 'manual',
			outcome: 'done' | 'missed' | 'pending'
		) =>
			app.ctx.db
				.insertInto('purge_commands')
				.values({
					id,
					vessel_id: port.vessel.id,
					requested_at: at,
					requested_by: source === 'schedule' ? 'schedule' : 'chief@demo.test',
					user_id: null,
					source,
					duration_s: 20,
					outcome
				})
				.execute();
		await purge('p1', h0 + 5 * MINUTE_MS, 'schedule', 'done');
		await purge('p2', h0 + 25 * MINUTE_MS, 'schedule', 'done');
		await purge('p3', h0 + 45 * MINUTE_MS, 'schedule', 'missed');
		await purge('p4', h0 + 50 * MINUTE_MS, 'manual', 'done');
		await purge('p5', h0 + 65 * MINUTE_MS, 'schedule', 'done'); // after the period

		const c = await compliance(port, h0, h0 + HOUR_MS);
		expect(c.alarms.by_type.low_flow).toEqual({ count: 0, seconds: 300 });
		expect(c.alarms.active_at_start).toBe(1);
		expect(c.alarms.by_type.low_flow_margin).toEqual({ count: 1, seconds: 120 });
		expect(c.alarms.by_type.separator_dp_high).toEqual({ count: 1, seconds: 600 });
		expect(c.alarms.count).toBe(2);
		expect(c.alarms.by_priority.alarm).toEqual({ count: 0, seconds: 300 });
		// warnings: 120 s + 600 s, not overlapping
		expect(c.alarms.by_priority.warning).toEqual({ count: 2, seconds: 720 });
		expect(c.alarms.seconds_in_any).toBe(1020);
		expect(c.alarms.items?.map((a) => a.type)).toEqual([
			'low_flow',
			'low_flow_margin',
			'separator_dp_high'
		]);
		// p1–p4 in the period: 3 from the schedule (2 done, 1 missed), 1 by hand (done)
		expect(c.purges).toMatchObject({
			total: 4,
			scheduled: 3,
			manual: 1,
			done: 3,
			missed: 1,
			pending: 0
		});
		// the flow itself was fine all hour
		expect(c.share_at_or_above_min).toBe(1);
	});

	it('time after now is not in the period', async () => {
		const now = Date.now();
		const c = await shaftCompliance(app.ctx.db, {
			shaftId: port.shaft.id,
			vesselId: port.vessel.id,
			from: now - HOUR_MS,
			to: now + HOUR_MS,
			now,
			gapMs: port.gapMs,
			minimums: port.minimums
		});
		expect(c.to).toBe(now);
		expect(c.requested_to).toBe(now + HOUR_MS);
		expect(c.period_s).toBe(3600);
	});
});

describe('rollup-based compliance equals raw-based', () => {
	it('for any period over irregular data with gaps, dips, late and repeated samples', async () => {
		const min = main.minFlowLpm; // 90 L/min
		const start = T + 10 * HOUR_MS + 17_321;
		const rows: { ts: number; flow_lpm: number }[] = [];
		let seed = 11;
		const rand = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
		for (let t = start; t < start + 3.5 * HOUR_MS;) {
			rows.push({ ts: t, flow_lpm: Math.round(min * (0.7 + rand() * 0.8) * 100) / 100 });
			// mostly ~1 Hz, now and then a gap from 31 s to several minutes, sometimes exactly the threshold
			const r = rand();
			t +=
				r < 0.01
					? 31_000 + Math.floor(rand() * 300_000)
					: r < 0.015
						? 30_000
						: 700 + Math.floor(rand() * 800);
		}
		// shuffled in chunks so many arrive late, some sent twice
		const chunks: (typeof rows)[] = [];
		for (let i = 0; i < rows.length; i += 400) chunks.push(rows.slice(i, i + 400));
		for (let i = chunks.length - 1; i > 0; i -= 3)
			[chunks[i], chunks[i - 1]] = [chunks[i - 1], chunks[i]];
		for (const chunk of chunks) {
			for (const r of chunk) pipeline().handle(main.topic, Buffer.from(JSON.stringify(r)));
			for (const r of chunk.slice(0, 25))
				pipeline().handle(main.topic, Buffer.from(JSON.stringify(r)));
			pipeline().flush();
		}
		await pipeline().drain();

		const raw = (
			await app.ctx.db
				.selectFrom('samples')
				.select(['ts', 'flow_lpm'])
				.where('shaft_id', '=', main.shaft.id)
				.orderBy('ts')
				.execute()
		).map((r) => ({ ts: r.ts, flow_lpm: r.flow_lpm, below: r.flow_lpm < min }));
		expect(raw.length).toBeGreaterThan(3000);

		const periods: [number, number][] = [
			[start - HOUR_MS, start + 5 * HOUR_MS], // all of it, with unknown time either side
			[T + 11 * HOUR_MS, T + 13 * HOUR_MS], // aligned hours
			[start + 1234, start + 1234 + 45_000], // inside one or two minutes
			[start + 59_999, start + 60_001]
		];
		let s2 = 5;
		const r2 = () => (s2 = (s2 * 69069 + 1) % 2 ** 32) / 2 ** 32;
		for (let i = 0; i < 150; i++) {
			const a = start - 10 * MINUTE_MS + Math.floor(r2() * 4 * HOUR_MS);
			periods.push([a, a + 1 + Math.floor(r2() * r2() * 3 * HOUR_MS)]);
		}
		for (const [from, to] of periods) {
			const got = await coverageOf(app.ctx.db, main.shaft.id, from, to, main.gapMs, constantMinimum(min));
			const want = coverageFromPoints(raw, from, to, main.gapMs);
			expect([from, to, got.covered_ms, got.below_ms]).toEqual([
				from,
				to,
				want.covered_ms,
				want.below_ms
			]);
			const inside = raw.filter((p) => p.ts >= from && p.ts < to);
			const lowest = inside.length ? Math.min(...inside.map((p) => p.flow_lpm)) : null;
			expect(got.flow_min).toBe(lowest);
			if (lowest !== null)
				expect(inside.some((p) => p.ts === got.flow_min_at && p.flow_lpm === lowest)).toBe(true);
			// never more than two partial minutes of raw rows (at 1 Hz about 120, plus one either side of each)
			expect(got.read.raw_rows).toBeLessThanOrEqual(2 * (MINUTE_MS / 700 + 2));
		}
		// and the shares the API gives are the raw-based ones
		const [from, to] = periods[0];
		const c = await compliance(main, from, to);
		const want = sharesOf(coverageFromPoints(raw, from, to, main.gapMs), to - from);
		expect(c.share_at_or_above_min).toBeCloseTo(want.share_at_or_above_min, 12);
		expect(c.share_unknown).toBeCloseTo(want.share_unknown, 12);
		expect(c.share_unknown).toBeGreaterThan(0);
		expect(c.seconds_below_min).toBe(want.seconds_below_min);
	});
});

describe('history reads', () => {
	it('raw samples within the period; buckets from the rollups; raw refused beyond a day', async () => {
		const h0 = T + 3 * HOUR_MS;
		const raw = readSamples(
			app.ctx.sqlite,
			port.shaft.id,
			h0 + 20 * MINUTE_MS,
			h0 + 20 * MINUTE_MS + 10_000
		);
		// 1 Hz: 10 samples in a 10 s half-open period, all in the dip at 50 L/min
		expect(raw.map((s) => s.flow_lpm)).toEqual(Array(10).fill(50));
		const minutes = readBuckets(
			app.ctx.sqlite,
			port.shaft.id,
			'1m',
			h0 + 19 * MINUTE_MS,
			h0 + 21 * MINUTE_MS
		);
		expect(
			minutes.map((b) => [
				b.ts,
				b.n,
				b.flow_lpm?.min,
				b.flow_lpm?.max,
				b.seconds_below_min,
				b.covered_s
			])
		).toEqual([
			[h0 + 19 * MINUTE_MS, 60, 100, 100, 0, 60],
			[h0 + 20 * MINUTE_MS, 60, 50, 50, 60, 60]
		]);
		const hours = readBuckets(
			app.ctx.sqlite,
			port.shaft.id,
			'1h',
			h0 + 10 * MINUTE_MS,
			h0 + HOUR_MS
		);
		expect(hours).toHaveLength(1); // the bucket holding `from` is included whole
		expect(hours[0].flow_lpm?.min).toBe(50);
		// 300 of the hour's 3600 samples at 50, the rest at 100: mean (300 × 50 + 3300 × 100) / 3600
		expect(hours[0].flow_lpm?.mean).toBeCloseTo((300 * 50 + 3300 * 100) / 3600, 9);
		expect(() => readSamples(app.ctx.sqlite, port.shaft.id, h0, h0 + 86_400_001)).toThrow(
			/limited/
		);
		// asking for flow only leaves the other quantities out (null), the flow figures the same
		await ingest(port, [
			{ ts: h0 + 20 * MINUTE_MS + 500, flow_lpm: 50, supply_bar: 1.5 } as {
				ts: number;
				flow_lpm: number;
			}
		]);
		const all = readBuckets(
			app.ctx.sqlite,
			port.shaft.id,
			'1m',
			h0 + 20 * MINUTE_MS,
			h0 + 21 * MINUTE_MS
		);
		const flowOnly = readBuckets(
			app.ctx.sqlite,
			port.shaft.id,
			'1m',
			h0 + 20 * MINUTE_MS,
			h0 + 21 * MINUTE_MS,
			['flow_lpm']
		);
		expect(all[0].supply_bar).toEqual({ min: 1.5, max: 1.5, mean: 1.5 });
		expect(flowOnly[0]).toEqual({ ...all[0], supply_bar: null, temp_c: null, shaft_rpm: null });
	});
});

describe('a minimum changed', () => {
	it('samples are judged by the minimum in force when measured; the answer lists both minimums', async () => {
		// lakeline-wren port: 260 mm × 0.15 = 39 L/min; corrected to 300 mm → 45 L/min. 42 L/min is
		// above the first and below the second.
		let h = await shaft('lakeline-wren', 'port');
		expect(h.minFlowLpm).toBeCloseTo(39, 9);
		const a0 = Math.floor((Date.now() - 20 * MINUTE_MS) / 1000) * 1000;
		const a1 = a0 + 10 * MINUTE_MS;
		await ingest(h, everySecond(a0, a1, () => 42));

		await updateShaft(app.ctx, SYSTEM, h.shaft.id, { diameter_mm: 300 });
		const changes = await app.ctx.db.selectFrom('shaft_minimum_changes').selectAll().where('shaft_id', '=', h.shaft.id).execute();
		expect(changes).toHaveLength(1);
		expect([changes[0].from_lpm, changes[0].to_lpm, changes[0].changed_by]).toEqual([39, 45, 'system']);
		const c = changes[0].changed_at;
		for (let i = 0; i < 100 && app.ctx.services.telemetry!.registry.shaft(h.shaft.id)!.minFlowLpm !== 45; i++) {
			await new Promise((r) => setTimeout(r, 20)); // the registry reloads on config.changed
		}
		h = await shaft('lakeline-wren', 'port');
		expect(h.minFlowLpm).toBe(45);

		// after the change: 60 samples at 42, now below; and a late sample among the earlier ones,
		// whose minutes the writer recomputes — still against 39 L/min
		const b0 = Math.ceil((c + 1) / 1000) * 1000;
		await ingest(h, everySecond(b0, b0 + 59_000, () => 42));
		await ingest(h, [{ ts: a0 + 5 * MINUTE_MS + 500, flow_lpm: 42 }]);

		const to = b0 + 60_000;
		const got = await shaftCompliance(app.ctx.db, {
			shaftId: h.shaft.id,
			vesselId: h.vessel.id,
			from: a0,
			to,
			now: to + MINUTE_MS,
			gapMs: h.gapMs,
			minimums: h.minimums
		});
		// below: b0 … b0+59 s held sample to sample = 59 s (the last sample has no successor yet, so its
		// second is unknown); nothing of the 10 minutes before the change
		expect(got.seconds_below_min).toBe(59);
		expect(got.min_flow_lpm).toBe(45);
		expect(got.minimums).toEqual([
			{ from_ts: a0, min_flow_lpm: 39 },
			{ from_ts: c, min_flow_lpm: 45 }
		]);
		// the rollups agree with the raw rows judged the same way
		const raw = readSamples(app.ctx.sqlite, h.shaft.id, a0 - h.gapMs, to + h.gapMs);
		const direct = coverageFromPoints(
			raw.map((p) => ({ ts: p.ts, below: p.flow_lpm < (p.ts >= c ? 45 : 39) })),
			a0,
			to,
			h.gapMs
		);
		expect(got.seconds_below_min).toBe(direct.below_ms / 1000);
	});
});
