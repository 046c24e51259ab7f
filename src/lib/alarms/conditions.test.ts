import { describe, expect, it } from 'vitest';
import { minimumFlow } from '$lib/flow';
import { seaPressureAtCentreline } from '$lib/seawater';
import {
	flowCeiling,
	isStale,
	isSuppressedByDesign,
	lowFlow,
	lowFlowMargin,
	lowSupplyPressure,
	sensorFault,
	separatorDpHigh,
	shaftConditions,
	waterTempHigh,
	type ShaftLimits,
	type ShaftSample
} from './conditions';
import { DEFAULT_ALARM_SETTINGS as S } from './settings';
import { ALARM_TYPES } from './types';

// A 420 mm shaft with its centreline 4.2 m below the waterline, in sea water.
// Common practice (TRADE-FACTS.md): Q_min = 0.15 L/min per mm × 420 mm = 63 L/min.
const SHAFT: ShaftLimits = {
	min_flow_lpm: minimumFlow(420),
	sea_pressure_bar: seaPressureAtCentreline(4.2, 'sea')
};
const at = (p: Partial<ShaftSample>): ShaftSample => ({ ts: 0, flow_lpm: 100, ...p });
const judge = (c: { tripping: boolean; clearing: boolean } | null) =>
	c === null ? null : c.tripping ? 'trips' : c.clearing ? 'clears' : 'holds';

describe('low flow (below the minimum; 5 % deadband on return, ISA-18.2 (2009) [memory])', () => {
	it('has the hand-worked limits for a 420 mm shaft', () => {
		expect(SHAFT.min_flow_lpm).toBeCloseTo(63, 12);
		const c = lowFlow(at({ flow_lpm: 63 }), SHAFT, S)!;
		expect(c.trip_limit).toBeCloseTo(63, 12);
		expect(c.clear_limit).toBeCloseTo(66.15, 12); // 63 × (1 + 0.05)
	});

	it.each([
		[62.9, 'trips'],
		[63, 'holds'], // at the minimum is enough flow, but not yet back past the deadband
		[66.1, 'holds'],
		[66.15, 'clears'],
		[70, 'clears']
	])('%s L/min %s', (q, verdict) => {
		expect(judge(lowFlow(at({ flow_lpm: q }), SHAFT, S))).toBe(verdict);
	});

	it('a reading exactly at a limit counts as at it, despite binary rounding', () => {
		// 120 mm × 0.15 = 18 L/min; 18 × 1.05 = 18.9 L/min, which doubles compute as 18.900000000000002
		const small = { min_flow_lpm: minimumFlow(120), sea_pressure_bar: 0 };
		expect(small.min_flow_lpm * 1.05).toBeGreaterThan(18.9);
		expect(judge(lowFlow(at({ flow_lpm: 18.9 }), small, S))).toBe('clears');
	});
});

describe('low flow margin (warning band 20 % above the minimum)', () => {
	it.each([
		[75.5, 'trips'], // below 63 × 1.2 = 75.6 L/min
		[75.6, 'holds'],
		[78.7, 'holds'],
		[78.75, 'clears'], // 63 × (1 + 0.2 + 0.05) = 78.75 L/min
		[60, 'trips'] // below the minimum is inside the band too
	])('%s L/min %s', (q, verdict) => {
		expect(judge(lowFlowMargin(at({ flow_lpm: q }), SHAFT, S))).toBe(verdict);
	});
});

describe('low supply pressure (sea pressure + 0.3 bar; 2 % deadband, ISA-18.2 (2009) [memory])', () => {
	it('needs 0.72218 bar at 4.2 m of sea water', () => {
		// derived: 1025 kg/m³ × 9.80665 m/s² × 4.2 m = 42 217.63 Pa = 0.42218 bar; + 0.3 bar
		expect(SHAFT.sea_pressure_bar).toBeCloseTo((1025 * 9.80665 * 4.2) / 1e5, 12);
		const c = lowSupplyPressure(at({ supply_bar: 0.7 }), SHAFT, S)!;
		expect(c.trip_limit).toBeCloseTo(0.72218, 5);
		expect(c.clear_limit).toBeCloseTo(0.73662, 5); // 0.72218 × 1.02
	});

	it.each([
		[0.722, 'trips'],
		[0.7222, 'holds'],
		[0.7366, 'holds'],
		[0.7367, 'clears']
	])('%s bar %s', (p, verdict) => {
		expect(judge(lowSupplyPressure(at({ supply_bar: p }), SHAFT, S))).toBe(verdict);
	});

	it('gives no verdict when the gateway does not report supply pressure', () => {
		expect(lowSupplyPressure(at({}), SHAFT, S)).toBeNull();
		expect(lowSupplyPressure(at({ supply_bar: null }), SHAFT, S)).toBeNull();
	});
});

describe('water temperature high (above 45 °C; 1 °C deadband = 1 % of 0–100 °C, ISA-18.2 [memory])', () => {
	it.each([
		[45.1, 'trips'],
		[45, 'holds'],
		[44.1, 'holds'],
		[44, 'clears']
	])('%s °C %s', (t, verdict) => {
		expect(judge(waterTempHigh(at({ temp_c: t }), S))).toBe(verdict);
	});
});

describe('separator ΔP high (above 0.8 bar; clears at 98 %)', () => {
	it.each([
		[0.81, 'trips'],
		[0.8, 'holds'],
		[0.785, 'holds'],
		[0.784, 'clears'] // 0.8 × 0.98
	])('%s bar %s', (dp, verdict) => {
		expect(judge(separatorDpHigh({ ts: 0, dp_bar: dp }, S))).toBe(verdict);
	});

	it('gives no verdict without a ΔP reading', () => {
		expect(separatorDpHigh({ ts: 0 }, S)).toBeNull();
	});
});

describe('suppressed by design while stopped (ISA-18.2)', () => {
	it.each([
		[4, true],
		[5, false], // running_rpm_min 5 rpm counts as turning
		[-4, true], // astern, slow
		[-80, false],
		[null, false], // no speed signal: never suppressed
		[undefined, false]
	])('low flow at %s rpm suppressed: %s', (rpm, suppressed) => {
		expect(isSuppressedByDesign('low_flow', at({ shaft_rpm: rpm }), S)).toBe(suppressed);
	});

	it('applies only to low flow, low flow margin and low supply pressure', () => {
		const stopped = at({ shaft_rpm: 0 });
		const suppressed = ALARM_TYPES.filter((t) => isSuppressedByDesign(t, stopped, S));
		expect(suppressed).toEqual(['low_flow', 'low_flow_margin', 'low_supply_pressure']);
	});
});

describe('sensor fault: implausible readings trip at once', () => {
	it('caps flow at 50 × the minimum, and at 20 000 L/min', () => {
		expect(flowCeiling(SHAFT, S)).toBeCloseTo(3150, 9); // 50 × 63 L/min
		// 2000 mm at 0.5 L/min per mm: 1000 L/min minimum, 50 × = 50 000, capped
		expect(flowCeiling({ min_flow_lpm: 1000, sea_pressure_bar: 0 }, S)).toBe(20_000);
		expect(flowCeiling({ min_flow_lpm: 0, sea_pressure_bar: 0 }, S)).toBe(20_000);
	});

	it.each([
		[{ flow_lpm: 3151 }, ['flow_lpm']],
		[{ flow_lpm: 3150 }, []],
		[{ flow_lpm: -1 }, ['flow_lpm']],
		[{ temp_c: 95.1 }, ['temp_c']],
		[{ temp_c: -5.1 }, ['temp_c']],
		[{ temp_c: 95 }, []],
		[{ supply_bar: 25.1 }, ['supply_bar']],
		[{ supply_bar: -1.1 }, ['supply_bar']],
		[{ supply_bar: -1 }, []],
		[{ flow_lpm: 5000, temp_c: 120 }, ['flow_lpm', 'temp_c']]
	] as [Partial<ShaftSample>, string[]][])('%o → %o', (p, fields) => {
		const c = sensorFault(at(p), SHAFT, S, false);
		expect(c.faults.map((f) => f.field)).toEqual(fields);
		expect(c.tripping).toBe(fields.length > 0);
		expect(c.clearing).toBe(fields.length === 0);
	});

	it('a frozen flow trips, and an implausible value feeds no process alarm', () => {
		expect(sensorFault(at({ flow_lpm: 70 }), SHAFT, S, true).faults).toEqual([
			{ field: 'flow_lpm', reason: 'frozen', value: 70 }
		]);
		const all = shaftConditions(at({ flow_lpm: 5000, temp_c: 120 }), SHAFT, S, false);
		expect(all.low_flow).toBeNull();
		expect(all.low_flow_margin).toBeNull();
		expect(all.water_temp_high).toBeNull(); // a broken thermometer is not a hot bearing
		expect(all.sensor_fault.tripping).toBe(true);
	});
});

describe('stale data (more than 30 s without a message)', () => {
	it.each([
		[30_000, false],
		[30_001, true],
		[-5_000, false] // a message stamped ahead of the server clock
	])('%s ms since the last message → stale %s', (age, stale) => {
		const now = Date.UTC(2026, 0, 15);
		expect(isStale(now - age, now, S)).toBe(stale);
	});
});
