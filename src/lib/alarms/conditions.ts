/**
 * From one sample and the shaft's limits to each alarm's raise and clear
 * conditions, which the debouncer turns into raises and clears.
 *
 * A reading that is physically implausible is not evidence of anything but a
 * bad sensor: it raises sensor_fault and gives no verdict (null) for the alarm
 * it would otherwise feed, so a broken thermometer reads as a sensor fault and
 * not as a hot bearing. A null is fed to the debouncer as neither tripping nor
 * clearing (or skipped), so the alarm holds where it was.
 */
import type { AlarmSettings } from './settings';
import { SUPPRESSIBLE_WHEN_STOPPED, type AlarmType } from './types';

export interface ShaftSample {
	/** epoch ms */
	ts: number;
	flow_lpm: number;
	supply_bar?: number | null;
	temp_c?: number | null;
	/** negative when turning astern */
	shaft_rpm?: number | null;
}

export interface ShaftLimits {
	min_flow_lpm: number;
	/** gauge sea pressure at the shaft centreline (seaPressureAtCentreline), bar */
	sea_pressure_bar: number;
}

export interface SeparatorSample {
	ts: number;
	dp_bar?: number | null;
}

export interface Condition {
	tripping: boolean;
	clearing: boolean;
	/** the reading judged, in the unit of the limits */
	value: number;
	/** raises beyond this */
	trip_limit: number;
	/** clears at or past this; the deadband lies between the two */
	clear_limit: number;
}

export type SensorField = 'flow_lpm' | 'temp_c' | 'supply_bar';

export interface SensorFault {
	field: SensorField;
	reason: 'implausible' | 'frozen';
	value: number;
}

export interface SensorFaultCondition {
	tripping: boolean;
	clearing: boolean;
	faults: SensorFault[];
}

/** ISA-18.2 (2009) guidance table, pressure 2 % [memory]; of the setpoint, as the range is unknown. */
export const PRESSURE_DEADBAND = 0.02;
/** ISA-18.2 (2009) guidance table, temperature 1 % of range [memory]: 1 °C on 0–100 °C. */
export const TEMP_DEADBAND_C = 1;

// A reading exactly at a limit counts as at the limit, whatever the binary
// rounding of the product that made the limit (18 × 1.05 computes as 18.900000000000002).
const REL_EPS = 1e-9;
const below = (v: number, limit: number) => v < limit - REL_EPS * Math.abs(limit);
const above = (v: number, limit: number) => v > limit + REL_EPS * Math.abs(limit);

function lowCondition(value: number, trip: number, clear: number): Condition {
	return {
		tripping: below(value, trip),
		clearing: !below(value, clear),
		value,
		trip_limit: trip,
		clear_limit: clear
	};
}

function highCondition(value: number, trip: number, clear: number): Condition {
	return {
		tripping: above(value, trip),
		clearing: !above(value, clear),
		value,
		trip_limit: trip,
		clear_limit: clear
	};
}

const reported = (v: number | null | undefined): v is number =>
	typeof v === 'number' && Number.isFinite(v);

/** Above this the flow reading cannot be real: a multiple of the minimum, capped absolutely. */
export function flowCeiling(shaft: ShaftLimits, s: AlarmSettings): number {
	const byShaft = shaft.min_flow_lpm > 0 ? s.flow_plausible_factor * shaft.min_flow_lpm : Infinity;
	return Math.min(byShaft, s.flow_plausible_max_lpm);
}

const flowPlausible = (flow: number, shaft: ShaftLimits, s: AlarmSettings) =>
	flow >= 0 && !above(flow, flowCeiling(shaft, s));
const tempPlausible = (t: number, s: AlarmSettings) =>
	!below(t, s.temp_plausible_min_c) && !above(t, s.temp_plausible_max_c);
const supplyPlausible = (p: number, s: AlarmSettings) =>
	!below(p, s.supply_plausible_min_bar) && !above(p, s.supply_plausible_max_bar);

/** low_flow: raise below the minimum, clear at minimum × (1 + flow_deadband). */
export function lowFlow(sample: ShaftSample, shaft: ShaftLimits, s: AlarmSettings) {
	const q = sample.flow_lpm;
	const min = shaft.min_flow_lpm;
	if (!reported(q) || !(min > 0) || !flowPlausible(q, shaft, s)) return null;
	return lowCondition(q, min, min * (1 + s.flow_deadband));
}

/** low_flow_margin: raise below minimum × (1 + margin_warning), clear a deadband above that. */
export function lowFlowMargin(sample: ShaftSample, shaft: ShaftLimits, s: AlarmSettings) {
	const q = sample.flow_lpm;
	const min = shaft.min_flow_lpm;
	if (!reported(q) || !(min > 0) || !flowPlausible(q, shaft, s)) return null;
	return lowCondition(
		q,
		min * (1 + s.margin_warning),
		min * (1 + s.margin_warning + s.flow_deadband)
	);
}

/** low_supply_pressure: supply must exceed sea pressure + supply_margin_bar; only when reported. */
export function lowSupplyPressure(sample: ShaftSample, shaft: ShaftLimits, s: AlarmSettings) {
	const p = sample.supply_bar;
	if (!reported(p) || !reported(shaft.sea_pressure_bar) || !supplyPlausible(p, s)) return null;
	const trip = shaft.sea_pressure_bar + s.supply_margin_bar;
	return lowCondition(p, trip, trip + PRESSURE_DEADBAND * Math.abs(trip));
}

/** water_temp_high: raise above water_temp_max_c, clear 1 °C below it. */
export function waterTempHigh(sample: ShaftSample, s: AlarmSettings) {
	const t = sample.temp_c;
	if (!reported(t) || !tempPlausible(t, s)) return null;
	return highCondition(t, s.water_temp_max_c, s.water_temp_max_c - TEMP_DEADBAND_C);
}

/** separator_dp_high: raise above separator_dp_max_bar, clear at 98 % of it. */
export function separatorDpHigh(sample: SeparatorSample, s: AlarmSettings) {
	const dp = sample.dp_bar;
	if (!reported(dp)) return null;
	return highCondition(
		dp,
		s.separator_dp_max_bar,
		s.separator_dp_max_bar * (1 - PRESSURE_DEADBAND)
	);
}

/** The gateway reports the shaft turning (either way) at or above running_rpm_min. */
export function isTurning(sample: ShaftSample, s: AlarmSettings): boolean {
	return reported(sample.shaft_rpm) && Math.abs(sample.shaft_rpm) >= s.running_rpm_min;
}

/**
 * Suppressed by design (ISA-18.2): a flow alarm on a shaft the gateway reports
 * stopped. Without a speed signal nothing is suppressed: better a low-flow alarm
 * in port than none at sea.
 */
export function isSuppressedByDesign(
	type: AlarmType,
	sample: ShaftSample,
	s: AlarmSettings
): boolean {
	return (
		SUPPRESSIBLE_WHEN_STOPPED.includes(type) &&
		reported(sample.shaft_rpm) &&
		Math.abs(sample.shaft_rpm) < s.running_rpm_min
	);
}

/** Each physically implausible reading in the sample. */
export function implausibleReadings(
	sample: ShaftSample,
	shaft: ShaftLimits,
	s: AlarmSettings
): SensorFault[] {
	const faults: SensorFault[] = [];
	const add = (field: SensorField, value: number) =>
		faults.push({ field, reason: 'implausible', value });
	if (!reported(sample.flow_lpm) || !flowPlausible(sample.flow_lpm, shaft, s)) {
		add('flow_lpm', sample.flow_lpm);
	}
	if (reported(sample.temp_c) && !tempPlausible(sample.temp_c, s)) add('temp_c', sample.temp_c);
	if (reported(sample.supply_bar) && !supplyPlausible(sample.supply_bar, s)) {
		add('supply_bar', sample.supply_bar);
	}
	return faults;
}

/**
 * sensor_fault: raise at once on an implausible reading or a frozen flow
 * (`frozen` from the shaft's StuckDetector); clear when every reading is
 * plausible and the flow is changing again.
 */
export function sensorFault(
	sample: ShaftSample,
	shaft: ShaftLimits,
	s: AlarmSettings,
	frozen: boolean
): SensorFaultCondition {
	const faults = implausibleReadings(sample, shaft, s);
	if (frozen) faults.push({ field: 'flow_lpm', reason: 'frozen', value: sample.flow_lpm });
	const tripping = faults.length > 0;
	return { tripping, clearing: !tripping, faults };
}

/** Every per-sample shaft condition at once; the types a sample cannot judge are null. */
export function shaftConditions(
	sample: ShaftSample,
	shaft: ShaftLimits,
	s: AlarmSettings,
	frozen: boolean
) {
	return {
		low_flow: lowFlow(sample, shaft, s),
		low_flow_margin: lowFlowMargin(sample, shaft, s),
		low_supply_pressure: lowSupplyPressure(sample, shaft, s),
		water_temp_high: waterTempHigh(sample, s),
		sensor_fault: sensorFault(sample, shaft, s, frozen)
	};
}

/**
 * stale_data, judged by a timer: more than stale_after_s since the last message.
 * Pass as lastSeenMs the later of the last message and when watching began
 * (server start), so a restart does not raise every shaft at once and a shaft
 * that has never reported goes stale stale_after_s after watching began.
 */
export function isStale(lastSeenMs: number, nowMs: number, s: AlarmSettings): boolean {
	return nowMs - lastSeenMs > s.stale_after_s * 1000;
}
