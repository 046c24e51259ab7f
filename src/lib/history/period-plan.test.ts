import { describe, expect, it } from 'vitest';
import { constantMinimum } from '../minimums';
import fc from 'fast-check';
import { bucketOf, coverageFromPoints, HOUR_MS, MINUTE_MS, splitInterval } from '../compliance';
import {
	combinePieces,
	edgePiece,
	planLength,
	planPeriod,
	type PieceSummary,
	type RawPoint,
	type Span
} from './period-plan';

const T0 = Date.UTC(2026, 0, 5, 0, 0, 0); // a Monday, 00:00 UTC: hour- and minute-aligned
const s = (sec: number) => T0 + sec * 1000;

describe('planPeriod (hand-worked)', () => {
	it('a period inside one minute is one raw piece', () => {
		// 00:00:10–00:00:50: no minute boundary inside
		expect(planPeriod(s(10), s(50))).toEqual({
			raw: [{ from: s(10), to: s(50) }],
			minutes: [],
			hours: null
		});
	});

	it('a period straddling one minute boundary is two raw pieces', () => {
		// 00:00:30–00:01:20: 30 s before 00:01, 20 s after
		expect(planPeriod(s(30), s(80))).toEqual({
			raw: [
				{ from: s(30), to: s(60) },
				{ from: s(60), to: s(80) }
			],
			minutes: [],
			hours: null
		});
	});

	it('whole minutes without a whole hour', () => {
		// 00:10:15–00:20:45 → raw 00:10:15–00:11, minutes 00:11–00:20, raw 00:20–00:20:45
		const p = planPeriod(s(615), s(1245));
		expect(p.raw).toEqual([
			{ from: s(615), to: s(660) },
			{ from: s(1200), to: s(1245) }
		]);
		expect(p.minutes).toEqual([{ from: s(660), to: s(1200) }]);
		expect(p.hours).toBeNull();
	});

	it('whole hours with minutes and raw edges either side', () => {
		// 23:59:30 the day before … 03:05:10: raw 30 s, minutes none before 00:00 (23:59:30 → ceil 00:00),
		// hours 00:00–03:00, minutes 03:00–03:05, raw 03:05–03:05:10
		const p = planPeriod(s(-30), s(3 * 3600 + 5 * 60 + 10));
		expect(p.raw).toEqual([
			{ from: s(-30), to: s(0) },
			{ from: s(3 * 3600 + 300), to: s(3 * 3600 + 310) }
		]);
		expect(p.minutes).toEqual([{ from: s(3 * 3600), to: s(3 * 3600 + 300) }]);
		expect(p.hours).toEqual({ from: s(0), to: s(3 * 3600) });
	});

	it('an aligned period has no raw pieces', () => {
		const p = planPeriod(T0, T0 + 24 * HOUR_MS);
		expect(p).toEqual({ raw: [], minutes: [], hours: { from: T0, to: T0 + 24 * HOUR_MS } });
	});

	it('an empty or reversed period has no pieces', () => {
		expect(planPeriod(s(10), s(10))).toEqual({ raw: [], minutes: [], hours: null });
		expect(planPeriod(s(20), s(10))).toEqual({ raw: [], minutes: [], hours: null });
	});

	it('tiles any period with aligned pieces and under two minutes of raw (property)', () => {
		fc.assert(
			fc.property(fc.integer({ min: 0, max: 4e11 }), fc.integer({ min: 1, max: 4e9 }), (a, len) => {
				const from = T0 + a;
				const to = from + len;
				const plan = planPeriod(from, to);
				expect(planLength(plan)).toBe(len);
				const pieces: Span[] = [
					...plan.raw,
					...plan.minutes,
					...(plan.hours ? [plan.hours] : [])
				].sort((x, y) => x.from - y.from);
				expect(pieces[0].from).toBe(from);
				expect(pieces.at(-1)!.to).toBe(to);
				for (let i = 1; i < pieces.length; i++) expect(pieces[i].from).toBe(pieces[i - 1].to);
				for (const m of plan.minutes)
					expect([m.from % MINUTE_MS, m.to % MINUTE_MS]).toEqual([0, 0]);
				if (plan.hours)
					expect([plan.hours.from % HOUR_MS, plan.hours.to % HOUR_MS]).toEqual([0, 0]);
				expect(plan.raw.length).toBeLessThanOrEqual(2);
				for (const r of plan.raw) expect(r.to - r.from).toBeLessThan(MINUTE_MS);
				// minutes beside the hours: under an hour on each side
				expect(plan.minutes.reduce((t, m) => t + m.to - m.from, 0)).toBeLessThan(2 * HOUR_MS);
			})
		);
	});
});

describe('edgePiece (hand-worked)', () => {
	const gap = 30_000;
	const min = 90;
	it('counts the sample before the edge holding into it, and the lowest sample inside', () => {
		// samples at 00:00:50 (100 L/min), 00:01:05 (80), 00:01:20 (95), 00:01:40 (70, after the edge)
		const points: RawPoint[] = [
			{ ts: s(50), flow_lpm: 100 },
			{ ts: s(65), flow_lpm: 80 },
			{ ts: s(80), flow_lpm: 95 },
			{ ts: s(100), flow_lpm: 70 }
		];
		// edge 00:01:00–00:01:30:
		//   00:01:00–00:01:05 held by the 100 L/min sample: 5 s covered, above
		//   00:01:05–00:01:20 the 80 L/min sample: 15 s covered, below 90
		//   00:01:20–00:01:30 the 95 L/min sample (next at 00:01:40, 20 s ≤ 30 s): 10 s covered, above
		// → 30 s covered, 15 s below; lowest inside is 80 at 00:01:05 (70 is after the edge)
		expect(edgePiece(points, { from: s(60), to: s(90) }, gap, constantMinimum(min))).toEqual({
			covered_ms: 30_000,
			below_ms: 15_000,
			flow_min: 80,
			flow_min_at: s(65)
		});
	});

	it('a gap longer than the stale threshold leaves the edge unknown', () => {
		// 00:00:00 then 00:01:00: a 60 s gap > 30 s → nothing held over 00:00:20–00:00:40
		const points: RawPoint[] = [
			{ ts: s(0), flow_lpm: 100 },
			{ ts: s(60), flow_lpm: 100 }
		];
		expect(edgePiece(points, { from: s(20), to: s(40) }, gap, constantMinimum(min))).toEqual({
			covered_ms: 0,
			below_ms: 0,
			flow_min: null,
			flow_min_at: null
		});
	});
});

describe('combinePieces', () => {
	it('adds coverage and keeps the lowest flow, the earlier on a tie', () => {
		const pieces: PieceSummary[] = [
			{ covered_ms: 1000, below_ms: 0, flow_min: 95, flow_min_at: 50 },
			{ covered_ms: 2000, below_ms: 500, flow_min: 80, flow_min_at: 70 },
			{ covered_ms: 0, below_ms: 0, flow_min: null, flow_min_at: null },
			{ covered_ms: 3000, below_ms: 100, flow_min: 80, flow_min_at: 10 }
		];
		expect(combinePieces(pieces)).toEqual({
			covered_ms: 6000,
			below_ms: 600,
			flow_min: 80,
			flow_min_at: 10
		});
	});
});

/**
 * The claim the design rests on: rollups built by the sample-hold rule plus
 * raw edges give the same coverage as coverageFromPoints over every sample.
 * Here the rollups are built in memory the way the writer builds them
 * (each held interval split across buckets); tests/history-compliance.test.ts
 * proves the same against the real writer.
 */
describe('plan + rollups == all raw samples (property)', () => {
	const gap = 30_000;
	const min = 90;
	function rollups(points: RawPoint[], size: number) {
		const map = new Map<number, PieceSummary>();
		const get = (b: number) =>
			map.get(b) ??
			map.set(b, { covered_ms: 0, below_ms: 0, flow_min: null, flow_min_at: null }).get(b)!;
		for (let i = 0; i < points.length; i++) {
			const p = points[i];
			const r = get(bucketOf(p.ts, size));
			if (r.flow_min === null || p.flow_lpm < r.flow_min) {
				r.flow_min = p.flow_lpm;
				r.flow_min_at = p.ts;
			}
			const next = points[i + 1];
			if (next && next.ts - p.ts <= gap) {
				splitInterval(p.ts, next.ts, size, (b, ms) => {
					const q = get(b);
					q.covered_ms += ms;
					if (p.flow_lpm < min) q.below_ms += ms;
				});
			}
		}
		return map;
	}
	const sumRange = (map: Map<number, PieceSummary>, span: Span, size: number) => {
		const out: PieceSummary[] = [];
		for (let b = span.from; b < span.to; b += size) if (map.has(b)) out.push(map.get(b)!);
		return out;
	};

	it('agrees to the millisecond on irregular data with gaps', () => {
		const steps = fc.array(
			fc.record({
				dt: fc.oneof(fc.integer({ min: 1, max: 2_000 }), fc.integer({ min: 20_000, max: 400_000 })),
				flow: fc.integer({ min: 60, max: 120 })
			}),
			{ minLength: 2, maxLength: 400 }
		);
		fc.assert(
			fc.property(
				steps,
				fc.integer({ min: 0, max: 1e6 }),
				fc.double({ min: 0, max: 1, noNaN: true }),
				fc.double({ min: 0, max: 1, noNaN: true }),
				(st, offset, fa, fb) => {
					let t = T0 + 3 * HOUR_MS - 500_000 + offset;
					const points: RawPoint[] = st.map(({ dt, flow }) => ({ ts: (t += dt), flow_lpm: flow }));
					const first = points[0].ts - 100_000;
					const last = points.at(-1)!.ts + 100_000;
					const from = Math.round(first + (last - first) * Math.min(fa, fb));
					const to = Math.round(first + (last - first) * Math.max(fa, fb)) + 1;
					const m = rollups(points, MINUTE_MS);
					const h = rollups(points, HOUR_MS);
					const plan = planPeriod(from, to);
					const pieces: PieceSummary[] = [
						...plan.raw.map((span) => {
							const inside = points.filter((p) => p.ts >= span.from && p.ts < span.to);
							const before = points.filter((p) => p.ts < span.from).at(-1);
							const after = points.find((p) => p.ts >= span.to);
							return edgePiece(
								[...(before ? [before] : []), ...inside, ...(after ? [after] : [])],
								span,
								gap,
								constantMinimum(min)
							);
						}),
						...plan.minutes.flatMap((span) => sumRange(m, span, MINUTE_MS)),
						...(plan.hours ? sumRange(h, plan.hours, HOUR_MS) : [])
					];
					const got = combinePieces(pieces);
					const want = coverageFromPoints(
						points.map((p) => ({ ts: p.ts, below: p.flow_lpm < min })),
						from,
						to,
						gap
					);
					expect([got.covered_ms, got.below_ms]).toEqual([want.covered_ms, want.below_ms]);
					const inPeriod = points.filter((p) => p.ts >= from && p.ts < to);
					const lowest = inPeriod.length ? Math.min(...inPeriod.map((p) => p.flow_lpm)) : null;
					expect(got.flow_min).toBe(lowest);
					if (lowest !== null)
						expect(inPeriod.find((p) => p.ts === got.flow_min_at)?.flow_lpm).toBe(lowest);
				}
			),
			{ numRuns: 300 }
		);
	});
});
