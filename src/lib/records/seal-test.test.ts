import { describe, expect, it } from 'vitest';
import {
	DEFAULT_HOLD_S,
	DEFAULT_TEST_PRESSURE_BAR,
	judgeSealTest,
	pressurePerKelvinBar,
	type PressureReading
} from './seal-test';

/** readings every 30 s from `from` to `to` seconds, all at `bar` unless `at` says otherwise */
function series(
	from: number,
	to: number,
	bar: number,
	at: Record<number, number> = {}
): PressureReading[] {
	const out: PressureReading[] = [];
	for (let t = from; t <= to; t += 30) out.push({ t_s: t, pressure_bar: at[t] ?? bar });
	return out;
}

const base = { test_pressure_bar: 3, hold_s: 180, resolution_bar: 0.01, leak_seen: false };

describe('seal pressure test', () => {
	it('defaults to 3 bar held 3 minutes', () => {
		// common practice: fill between the seals, 3 bar, hold 3 minutes, no fall-off
		expect(DEFAULT_TEST_PRESSURE_BAR).toBe(3);
		expect(DEFAULT_HOLD_S).toBe(180);
	});

	it('passes 3 bar held 3 minutes with no fall', () => {
		// common practice: 3 bar, 3 minutes, no fall in pressure, no visible leak
		const j = judgeSealTest({ ...base, readings: series(0, 180, 3.0) });
		expect(j.result).toBe('pass');
		expect(j.held_s).toBe(180);
		expect(j.drop_bar).toBe(0);
		expect(j.reasons).toEqual([]);
	});

	it('counts the hold from the first reading at the test pressure', () => {
		// pressurising takes 60 s; 60 + 180 = 240 s of readings hold 180 s
		const rising = [
			{ t_s: 0, pressure_bar: 0 },
			{ t_s: 30, pressure_bar: 1.5 },
			...series(60, 240, 3.0)
		];
		const j = judgeSealTest({ ...base, readings: rising });
		expect(j.reached_at_s).toBe(60);
		expect(j.held_s).toBe(180);
		expect(j.result).toBe('pass');
	});

	it('fails a hold shorter than the hold time', () => {
		const j = judgeSealTest({ ...base, readings: series(0, 150, 3.0) });
		expect(j.result).toBe('fail');
		expect(j.reasons.join()).toMatch(/held 150 s, less than the hold time of 3 min/);
	});

	it('fails a fall the gauge can show, passes one it cannot', () => {
		// a fall of 0.02 bar on a 0.01-bar gauge is a fall; 0.005 bar is below its resolution
		const falling = judgeSealTest({ ...base, readings: series(0, 180, 3.0, { 180: 2.98 }) });
		expect(falling.result).toBe('fail');
		expect(falling.drop_bar).toBeCloseTo(0.02, 12);
		const within = judgeSealTest({ ...base, readings: series(0, 180, 3.0, { 180: 2.995 }) });
		expect(within.result).toBe('pass');
		// exactly one step of the gauge is a fall, whatever binary rounding makes of the decimals
		for (const [from, to] of [
			[3.0, 2.99],
			[3.01, 3.0],
			[3.02, 3.01]
		]) {
			expect([
				from,
				to,
				judgeSealTest({ ...base, readings: series(0, 180, from, { 180: to }) }).result
			]).toEqual([from, to, 'fail']);
		}
	});

	it('fails a fall of more than 10 % of the start pressure whatever the gauge', () => {
		// ASTM E2930: the total drop stays below 10 % of the start pressure
		const coarse = { ...base, resolution_bar: 0.5 };
		const j = judgeSealTest({ ...coarse, readings: series(0, 180, 3.0, { 150: 2.6, 180: 2.6 }) });
		// drop 0.4 bar < resolution 0.5, but 0.4 / 3.0 = 13 % > 10 %
		expect(j.drop_share).toBeCloseTo(0.4 / 3, 12);
		expect(j.result).toBe('fail');
		expect(j.reasons.join()).toMatch(/13 % of the pressure it fell from/);
	});

	it('measures a fall from the peak when the pressure overshoots and then sinks', () => {
		// 3.00 → 3.40 → 3.05 bar: a fall of 0.35 bar, 0.35 / 3.40 = 10.3 % of the pressure it fell from
		const j = judgeSealTest({ ...base, readings: series(0, 180, 3.05, { 0: 3.0, 30: 3.4 }) });
		expect(j.drop_bar).toBeCloseTo(0.35, 12);
		expect(j.drop_share).toBeCloseTo(0.35 / 3.4, 12);
		expect(j.result).toBe('fail');
		expect(j.reasons.join()).toMatch(/10 % of the pressure it fell from, more than 10 %/);
	});

	it('warns of a gauge coarser than a tenth of the leak limit', () => {
		// ASTM E2930: resolution 10× finer than the leak limit; 10 % of 3 bar ÷ 10 = 0.03 bar
		expect(
			judgeSealTest({ ...base, resolution_bar: 0.03, readings: series(0, 180, 3) }).warnings
		).toEqual([]);
		expect(
			judgeSealTest({ ...base, resolution_bar: 0.1, readings: series(0, 180, 3) }).warnings[0]
		).toMatch(/0\.03 bar or finer/);
	});

	it('fails when the pressure was never reached, or a leak was seen', () => {
		const never = judgeSealTest({ ...base, readings: series(0, 300, 2.5) });
		expect(never.result).toBe('fail');
		expect(never.reached_at_s).toBeNull();
		expect(never.reasons[0]).toMatch(/never reached/);
		const leak = judgeSealTest({ ...base, leak_seen: true, readings: series(0, 180, 3) });
		expect(leak.result).toBe('fail');
		expect(leak.reasons).toEqual(['a leak was seen']);
	});

	it('judges readings given out of order the same', () => {
		const r = series(0, 180, 3.0, { 90: 2.9 });
		expect(judgeSealTest({ ...base, readings: [...r].reverse() })).toEqual(
			judgeSealTest({ ...base, readings: r })
		);
	});

	it('gives the thermal drift of a trapped volume as p_abs / T', () => {
		// derived from the gas law (TRADE-FACTS: ≈ p_abs/T per kelvin, about 1 kPa per K at 3 bar gauge):
		// (3 + 1.01325) bar ÷ 293.15 K = 0.013690 bar/K = 1.37 kPa/K
		expect(pressurePerKelvinBar(3, 20)).toBeCloseTo(4.01325 / 293.15, 12);
		expect(pressurePerKelvinBar(3, 20) * 100).toBeCloseTo(1.369, 3);
	});
});
