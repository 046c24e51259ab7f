import { describe, expect, it } from 'vitest';
import { lusolve, matrix, multiply, transpose } from 'mathjs';
import { fitLine, MS_PER_YEAR, wearTrend } from './wear';

const t0 = Date.UTC(2020, 0, 1);
const at = (years: number) => t0 + years * MS_PER_YEAR;

describe('least-squares line', () => {
	it('matches the normal equations solved by mathjs', () => {
		// reference: mathjs lusolve of (XᵀX) β = Xᵀy, the least-squares normal equations
		const xs = [0, 0.8, 2.1, 2.9, 4.2, 5.0];
		const ys = [0.02, 0.41, 1.05, 1.32, 2.11, 2.4];
		const X = matrix(xs.map((x) => [1, x]));
		const Xt = transpose(X);
		const beta = lusolve(multiply(Xt, X), multiply(Xt, matrix(ys)))
			.toArray()
			.flat() as number[];
		const line = fitLine(xs, ys)!;
		expect(line.intercept).toBeCloseTo(beta[0], 12);
		expect(line.slope).toBeCloseTo(beta[1], 12);
	});

	it('has no line through one point or one x', () => {
		expect(fitLine([1], [1])).toBeNull();
		expect(fitLine([2, 2], [1, 3])).toBeNull();
	});
});

describe('wear-down trend', () => {
	// hand-worked: readings 2.0, 2.5, 3.1, 3.4 mm at 0, 1, 2, 3 years → wear 0, 0.5, 1.1, 1.4
	// x̄ = 1.5, ȳ = 0.75; Sxx = 2.25 + 0.25 + 0.25 + 2.25 = 5
	// Sxy = (−1.5)(−0.75) + (−0.5)(−0.25) + (0.5)(0.35) + (1.5)(0.65) = 2.4
	// slope = 2.4 / 5 = 0.48 mm/year; intercept = 0.75 − 0.48 × 1.5 = 0.03 mm
	// limit 4 mm reached at (4 − 0.03) / 0.48 = 8.2708 years
	const readings = [
		{ measured_at: at(0), reading_mm: 2.0 },
		{ measured_at: at(1), reading_mm: 2.5 },
		{ measured_at: at(2), reading_mm: 3.1 },
		{ measured_at: at(3), reading_mm: 3.4 }
	];

	it('measures wear from the installation reading and fits its rate', () => {
		const t = wearTrend([...readings].reverse(), 4);
		expect(t.baseline).toEqual(readings[0]);
		expect(t.points.map((p) => p.wear_mm)).toEqual(
			[0, 0.5, 1.1, 1.4].map((w) => expect.closeTo(w, 12))
		);
		expect(t.rate_mm_per_year).toBeCloseTo(0.48, 12);
		expect(t.intercept_mm).toBeCloseTo(0.03, 12);
		expect(t.latest_wear_mm).toBeCloseTo(1.4, 12);
		expect(t.remaining_mm).toBeCloseTo(2.6, 12);
		expect((t.projected_limit_at! - t0) / MS_PER_YEAR).toBeCloseTo(3.97 / 0.48, 6);
		expect(t.state).toBe('ok');
	});

	it('says when the limit is reached and projects nothing for a falling line', () => {
		expect(wearTrend(readings, 1.2).state).toBe('at_limit');
		const settling = wearTrend([readings[0], { measured_at: at(1), reading_mm: 1.9 }], 4);
		expect(settling.rate_mm_per_year).toBeLessThan(0);
		expect(settling.projected_limit_at).toBeNull();
	});

	it('with no limit gives the rate but no projection; with no readings, nothing', () => {
		const t = wearTrend(readings, null);
		expect(t.rate_mm_per_year).toBeCloseTo(0.48, 12);
		expect(t.projected_limit_at).toBeNull();
		expect(t.remaining_mm).toBeNull();
		expect(wearTrend([], 4).state).toBe('no_readings');
	});
});
