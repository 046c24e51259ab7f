import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { purgeScheduleInput } from './input';
import {
	DP_TARGET_FRACTION,
	dpTrend,
	median,
	slopeBarPerHour,
	SUGGESTED_INTERVALS_MIN,
	suggestInterval,
	type DpSample
} from './trend';

const T0 = Date.parse('2026-01-10T00:00:00Z');
const at = (h: number, m = 0, sec = 0) => T0 + ((h * 60 + m) * 60 + sec) * 1000;
const sample = (t: number, dp_bar: number): DpSample => ({ at: t, dp_bar });

describe('median and slope', () => {
	it('takes the median of odd and even counts, null for none', () => {
		expect(median([0.52, 0.5, 0.51])).toBe(0.51);
		expect(median([1, 4, 2, 3])).toBe(2.5);
		expect(median([])).toBeNull();
		expect(median([Number.NaN])).toBeNull();
	});

	it('fits a least-squares slope in bar per hour (worked by hand)', () => {
		// t = 0, 1, 2, 3 h; ΔP = 0.30, 0.35, 0.38, 0.45 bar
		// x̄ = 1.5 h, ȳ = 1.48 / 4 = 0.37 bar
		// Σ(x − x̄)(y − ȳ) = (−1.5)(−0.07) + (−0.5)(−0.02) + (0.5)(0.01) + (1.5)(0.08) = 0.24
		// Σ(x − x̄)² = 2.25 + 0.25 + 0.25 + 2.25 = 5 → slope = 0.24 / 5 = 0.048 bar/h
		const series = [0.3, 0.35, 0.38, 0.45].map((dp, h) => sample(at(h), dp));
		expect(slopeBarPerHour(series)).toBeCloseTo(0.048, 12);
		expect(slopeBarPerHour(series.slice(0, 1))).toBeNull();
		expect(slopeBarPerHour([sample(at(1), 0.3), sample(at(1), 0.4)])).toBeNull();
	});
});

describe('dpTrend', () => {
	const purges = [
		{ opened_at: at(0), closed_at: at(0, 0, 20) },
		{ opened_at: at(3, 30, 30), closed_at: at(3, 30, 50) }
	];
	const samples = [
		// before purge 1 (the minute before 00:00:00): median 0.51
		sample(at(0, 0, -50), 0.5),
		sample(at(0, 0, -30), 0.52),
		sample(at(0, 0, -10), 0.51),
		// after purge 1 (the minute after 00:00:20): median 0.30; inside the 60 s settling time
		sample(at(0, 0, 30), 0.31),
		sample(at(0, 0, 50), 0.3),
		sample(at(0, 1, 10), 0.29),
		// between purges: the hand-worked series above, 0.048 bar/h
		sample(at(0, 30), 0.3),
		sample(at(1, 30), 0.35),
		sample(at(2, 30), 0.38),
		sample(at(3, 30), 0.45), // also the minute before purge 2
		sample(at(3, 31), 0.28), // after purge 2, settling
		// since purge 2: x = 0, 1, 2 h; ȳ = 1.18 / 3; Σ(x − x̄)(y − ȳ) = 0.45 − 0.33 = 0.12;
		// Σ(x − x̄)² = 2 → 0.06 bar/h
		sample(at(4, 30), 0.33),
		sample(at(5, 30), 0.4),
		sample(at(6, 30), 0.45)
	];

	it('gives ΔP before and after each purge as medians over a minute', () => {
		const trend = dpTrend([...samples].reverse(), purges);
		expect(trend.purges.map((p) => [p.dp_before_bar, p.dp_after_bar])).toEqual([
			[0.51, 0.3],
			[0.45, 0.28]
		]);
		expect(trend.purges[0].drop_bar).toBeCloseTo(0.21, 12);
		expect(trend.purges[1].drop_bar).toBeCloseTo(0.17, 12);
	});

	it('gives the rate of rise between purges and since the last one', () => {
		const { intervals } = dpTrend(samples, purges);
		expect(intervals).toHaveLength(2);
		expect(intervals[0]).toMatchObject({
			from_at: at(0, 0, 20),
			to_at: at(3, 30, 30),
			current: false,
			samples: 4
		});
		expect(intervals[0].rate_bar_per_h).toBeCloseTo(0.048, 12);
		expect(intervals[1]).toMatchObject({ from_at: at(3, 30, 50), to_at: at(6, 30), current: true });
		expect(intervals[1].rate_bar_per_h).toBeCloseTo(0.06, 12);
	});

	it('gives no rate from too few samples or too short a span, and null ΔP without samples', () => {
		const few = dpTrend(samples.slice(0, 8), purges);
		expect(few.intervals[0]).toMatchObject({ samples: 2, rate_bar_per_h: null });
		const close = [0, 1, 2, 3].map((m) => sample(at(1, m), 0.3 + m / 100));
		expect(dpTrend(close, purges.slice(0, 1)).intervals[0].rate_bar_per_h).toBeNull(); // 3 min span
		expect(dpTrend([], purges).purges[0]).toMatchObject({ dp_before_bar: null, drop_bar: null });
	});
});

describe('suggestInterval', () => {
	it('targets 80 % of the ΔP alarm setpoint', () => {
		// common practice: act before the alarm, at about 80 % of its setpoint
		expect(DP_TARGET_FRACTION).toBe(0.8);
	});

	it('suggests a shorter interval when ΔP would reach the target before the next purge', () => {
		// median of the last three rates [0.05, 0.06, 0.20] = 0.06 bar/h; target 0.8 × 1.00 = 0.80 bar
		// from 0.60 bar: (0.80 − 0.60) / 0.06 = 3.33 h = 200 min < 240 min → round down to 180 min
		const s = suggestInterval(240, [0.04, 0.05, 0.06, 0.2], 1.0, 0.6);
		expect(s).not.toBeNull();
		expect(s?.interval_min).toBe(180);
		expect(s?.rate_bar_per_h).toBeCloseTo(0.06, 12);
		expect(s?.target_bar).toBeCloseTo(0.8, 12);
		expect(s?.reach_min).toBeCloseTo(200, 9);
		expect(s?.reason).toBe(
			'ΔP has been rising 0.060 bar/h between purges. From 0.60 bar after a purge it would reach ' +
				'0.80 bar (80 % of the 1.00 bar alarm setpoint) about 3 h 20 min later, before the next ' +
				'purge 4 h later. Suggestion: purge every 3 h. The schedule is not changed until you change it.'
		);
	});

	it('suggests nothing when the target is not reached before the next purge', () => {
		// from 0.30 bar: (0.80 − 0.30) / 0.06 = 8.33 h, beyond the 4 h interval
		expect(suggestInterval(240, [0.04, 0.05, 0.06, 0.2], 1.0, 0.3)).toBeNull();
	});

	it('lets no single odd interval decide', () => {
		// median of [0.01, 0.01, 0.5] = 0.01 bar/h: 0.2 / 0.01 = 20 h → none
		expect(suggestInterval(240, [0.01, 0.01, 0.5], 1.0, 0.6)).toBeNull();
		// median of [0.5, 0.5, 0.01] = 0.5 bar/h: 0.2 / 0.5 = 0.4 h = 24 min → 20 min
		expect(suggestInterval(240, [0.5, 0.5, 0.01], 1.0, 0.6)?.interval_min).toBe(20);
	});

	it('says to inspect when even the shortest interval is too long', () => {
		// 0.2 bar / 2 bar/h = 6 min < 15 min
		const s = suggestInterval(60, [2, 2, 2], 1.0, 0.6);
		expect(s?.interval_min).toBe(15);
		expect(s?.reason).toContain('inspect the separator');
		// already at 15 min: nothing shorter to suggest
		expect(suggestInterval(15, [2, 2, 2], 1.0, 0.6)).toBeNull();
	});

	it('suggests nothing without a rising rate, or when ΔP after a purge is already high', () => {
		expect(suggestInterval(240, [], 1.0, 0.6)).toBeNull();
		expect(suggestInterval(240, [null, -0.01, 0], 1.0, 0.6)).toBeNull();
		expect(suggestInterval(240, [0.5, 0.5, 0.5], 1.0, 0.8)).toBeNull();
		expect(suggestInterval(240, [0.5, 0.5, 0.5], 0, 0.6)).toBeNull();
	});

	it('only ever suggests a valid, shorter interval', () => {
		const arb = fc.record({
			current: fc.integer({ min: 15, max: 1440 }),
			rates: fc.array(fc.oneof(fc.constant(null), fc.double({ min: -1, max: 5, noNaN: true })), {
				maxLength: 5
			}),
			dpMax: fc.double({ min: 0.1, max: 3, noNaN: true }),
			after: fc.double({ min: 0, max: 3, noNaN: true })
		});
		// the property is the assertion (most random inputs suggest nothing, so count it as one)
		expect(() =>
			fc.assert(
				fc.property(arb, ({ current, rates, dpMax, after }) => {
					const s = suggestInterval(current, rates, dpMax, after);
					if (s === null) return true;
					const body = { enabled: true, interval_min: s.interval_min, duration_s: 5, reason: 'x' };
					return (
						SUGGESTED_INTERVALS_MIN.includes(s.interval_min) &&
						purgeScheduleInput.safeParse(body).success &&
						s.interval_min < current
					);
				})
			)
		).not.toThrow();
	});
});
