import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { bucketOf, coverageFromPoints, heldInterval, MINUTE_MS, sharesOf, splitInterval } from './compliance';

describe('splitInterval', () => {
	it('splits across bucket edges', () => {
		const parts: [number, number][] = [];
		splitInterval(50_000, 130_000, MINUTE_MS, (b, ms) => parts.push([b, ms]));
		// 50–60 s in bucket 0, 60–120 s in bucket 60 000, 120–130 s in bucket 120 000
		expect(parts).toEqual([
			[0, 10_000],
			[60_000, 60_000],
			[120_000, 10_000]
		]);
	});

	it('conserves the length of any interval (property)', () => {
		fc.assert(
			fc.property(fc.integer({ min: 0, max: 1e9 }), fc.integer({ min: 0, max: 1e7 }), (a, len) => {
				let total = 0;
				splitInterval(a, a + len, MINUTE_MS, (b, ms) => {
					expect(b).toBe(bucketOf(b, MINUTE_MS));
					total += ms;
				});
				return total === len;
			})
		);
	});
});

describe('heldInterval', () => {
	it('holds a sample until the next within the gap threshold, else unknown', () => {
		expect(heldInterval(0, 1000, 30_000)).toEqual([0, 1000]);
		expect(heldInterval(0, 30_000, 30_000)).toEqual([0, 30_000]);
		expect(heldInterval(0, 30_001, 30_000)).toBeNull();
	});
});

describe('coverageFromPoints (hand-worked)', () => {
	const gap = 30_000;
	it('1 Hz samples all above the minimum over 10 minutes: all compliant', () => {
		// samples at 0, 1, …, 600 s; each holds 1 s → 600 s covered, none below
		const points = Array.from({ length: 601 }, (_, i) => ({ ts: i * 1000, below: false }));
		const cov = coverageFromPoints(points, 0, 600_000, gap);
		expect(cov).toEqual({ covered_ms: 600_000, below_ms: 0 });
		expect(sharesOf(cov, 600_000).share_at_or_above_min).toBe(1);
	});

	it('a 2-minute gap is unknown, not compliant', () => {
		// samples every second over 0–240 s, but none between 60 s and 180 s:
		// the sample at 60 s is followed by the one at 180 s (gap 120 s > 30 s) → 120 s unknown
		const ts = [...Array.from({ length: 61 }, (_, i) => i * 1000), ...Array.from({ length: 61 }, (_, i) => 180_000 + i * 1000)];
		const cov = coverageFromPoints(ts.map((t) => ({ ts: t, below: false })), 0, 240_000, gap);
		expect(cov.covered_ms).toBe(120_000);
		const s = sharesOf(cov, 240_000);
		expect(s.share_unknown).toBe(0.5);
		expect(s.share_at_or_above_min).toBe(0.5);
		// of the 120 s with data, all 120 s were at or above the minimum
		expect(s.share_at_or_above_min_of_known).toBe(1);
	});

	it('the share of the time with data: 450 s of 600 s known, 150 s of them below → 0.75; none known → null', () => {
		// hand arithmetic: (600 − 150) / 600 = 0.75 of the known time; of the 1 200 s period, 450 / 1 200 = 0.375
		const s = sharesOf({ covered_ms: 600_000, below_ms: 150_000 }, 1_200_000);
		expect(s.share_at_or_above_min).toBe(0.375);
		expect(s.share_at_or_above_min_of_known).toBe(0.75);
		expect(sharesOf({ covered_ms: 0, below_ms: 0 }, 1_200_000).share_at_or_above_min_of_known).toBeNull();
	});

	it('clips to the period and counts the sample before it', () => {
		// samples every 10 s from 0 s; period 25–55 s; below from the 30 s sample on
		const points = [0, 10, 20, 30, 40, 50, 60].map((s) => ({ ts: s * 1000, below: s >= 30 }));
		const cov = coverageFromPoints(points, 25_000, 55_000, gap);
		// 25–30 s held by the 20 s sample (above); 30–55 s below → 30 s covered, 25 s below
		expect(cov).toEqual({ covered_ms: 30_000, below_ms: 25_000 });
	});
});
