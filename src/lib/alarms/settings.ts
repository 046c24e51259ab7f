/**
 * Alarm settings per shaft: setpoints, delays and sensor-plausibility limits.
 *
 * One table holds each setting's label, unit, bounds and default, so the form,
 * the API schema and the defaults cannot drift apart. Suggested delays and
 * deadbands are the ISA-18.2 (2009) guidance table [memory]: flow 15 s and 5 %,
 * pressure 15 s and 2 %, temperature 60 s and 1 % of range.
 *
 * Off-delays are separate settings beside each on-delay (not one shared number):
 * the guidance differs by quantity, and an on-delay and its off-delay are tuned
 * together against the same signal.
 */
import { z } from 'zod';
import type { Quantity } from '$lib/units';
import type { AlarmType } from './types';

export interface AlarmSettingField {
	label: string;
	/** the SI unit the value is stored in; '%' means a fraction shown as a percentage */
	unit: string;
	/** for conversion to the user's unit system with units.ts; null for times, speeds, ratios */
	quantity: Quantity | null;
	min: number;
	max: number;
	default: number;
}

const HOUR_S = 3600;
const delay = (label: string, dflt: number): AlarmSettingField => ({
	label,
	unit: 's',
	quantity: null,
	min: 0,
	max: HOUR_S,
	default: dflt
});

export const ALARM_SETTING_FIELDS = {
	// flow: ISA-18.2 (2009) 15 s on and off, 5 % deadband [memory]
	low_flow_delay_s: delay('Low-flow on-delay', 15),
	low_flow_off_delay_s: delay('Low-flow off-delay', 15),
	flow_deadband: {
		label: 'Flow deadband on return, share of the minimum',
		unit: '%',
		quantity: null,
		min: 0,
		max: 0.5,
		default: 0.05
	},
	margin_warning: {
		label: 'Low-margin warning band, above the minimum',
		unit: '%',
		quantity: null,
		min: 0,
		max: 2,
		default: 0.2
	},
	// pressure: ISA-18.2 (2009) 15 s on and off [memory]
	supply_margin_bar: {
		label: 'Supply pressure margin over sea pressure',
		unit: 'bar',
		quantity: 'pressure',
		min: 0,
		max: 10,
		default: 0.3
	},
	supply_delay_s: delay('Low supply pressure on-delay', 15),
	supply_off_delay_s: delay('Low supply pressure off-delay', 15),
	separator_dp_max_bar: {
		label: 'Separator ΔP high setpoint',
		unit: 'bar',
		quantity: 'pressure',
		min: 0.01,
		max: 10,
		default: 0.8
	},
	// a longer on-delay than supply pressure: ΔP swings while the purge valve opens and
	// closes, and clogging builds over hours; the off-delay follows the pressure guidance
	separator_dp_delay_s: delay('Separator ΔP on-delay', 60),
	separator_dp_off_delay_s: delay('Separator ΔP off-delay', 15),
	stale_after_s: {
		label: 'No data after',
		unit: 's',
		quantity: null,
		min: 1,
		max: HOUR_S,
		default: 30
	},
	// The bearing maker's limit governs. 45 °C is recalled from memory as a typical
	// limit for water-lubricated polymer bearings, not a published figure.
	water_temp_max_c: {
		label: 'Water temperature high setpoint',
		unit: '°C',
		quantity: 'temperature',
		min: 0,
		max: 100,
		default: 45
	},
	// temperature: ISA-18.2 (2009) 60 s on and off [memory]
	water_temp_delay_s: delay('Water temperature on-delay', 60),
	water_temp_off_delay_s: delay('Water temperature off-delay', 60),
	running_rpm_min: {
		label: 'Shaft counts as turning from',
		unit: 'rpm',
		quantity: null,
		min: 0,
		max: 200,
		default: 5
	},
	// A live flow transmitter never repeats the same value for minutes on end.
	sensor_stuck_s: {
		label: 'Flow reading counts as frozen after',
		unit: 's',
		quantity: null,
		min: 10,
		max: 24 * HOUR_S,
		default: 300
	},
	flow_plausible_factor: {
		label: 'Implausible flow above, times the minimum',
		unit: '×',
		quantity: null,
		min: 2,
		max: 1000,
		default: 50
	},
	flow_plausible_max_lpm: {
		label: 'Implausible flow above',
		unit: 'L/min',
		quantity: 'flow',
		min: 1,
		max: 100_000,
		default: 20_000
	},
	temp_plausible_min_c: {
		label: 'Implausible temperature below',
		unit: '°C',
		quantity: 'temperature',
		min: -50,
		max: 50,
		default: -5
	},
	temp_plausible_max_c: {
		label: 'Implausible temperature above',
		unit: '°C',
		quantity: 'temperature',
		min: 0,
		max: 150,
		default: 95
	},
	// gauge pressure: −1 bar is a perfect vacuum
	supply_plausible_min_bar: {
		label: 'Implausible supply pressure below',
		unit: 'bar',
		quantity: 'pressure',
		min: -1,
		max: 10,
		default: -1
	},
	supply_plausible_max_bar: {
		label: 'Implausible supply pressure above',
		unit: 'bar',
		quantity: 'pressure',
		min: 0,
		max: 100,
		default: 25
	}
} satisfies Record<string, AlarmSettingField>;

type Key = keyof typeof ALARM_SETTING_FIELDS;
const KEYS = Object.keys(ALARM_SETTING_FIELDS) as Key[];

function numberField(f: AlarmSettingField) {
	const unit = f.unit === '%' ? '' : ` ${f.unit}`;
	const shown = (v: number) => (f.unit === '%' ? `${Math.round(v * 1000) / 10} %` : `${v}${unit}`);
	return z
		.number({ error: 'a number' })
		.min(f.min, `at least ${shown(f.min)}`)
		.max(f.max, `at most ${shown(f.max)}`);
}

function shape<T extends z.ZodType>(make: (key: Key) => T): { [K in Key]: T } {
	return Object.fromEntries(KEYS.map((k) => [k, make(k)])) as { [K in Key]: T };
}

/**
 * Full settings; missing fields take their defaults, unknown fields are dropped
 * (so settings stored before a field was retired still read). Cross-field checks
 * keep the alarms able to sound.
 */
export const alarmSettings = z
	.object(
		shape((k) => numberField(ALARM_SETTING_FIELDS[k]).default(ALARM_SETTING_FIELDS[k].default))
	)
	.superRefine((s, ctx) => {
		if (s.temp_plausible_min_c >= s.temp_plausible_max_c) {
			ctx.addIssue({
				code: 'custom',
				path: ['temp_plausible_max_c'],
				message: 'above the implausible-low temperature'
			});
		}
		if (s.supply_plausible_min_bar >= s.supply_plausible_max_bar) {
			ctx.addIssue({
				code: 'custom',
				path: ['supply_plausible_max_bar'],
				message: 'above the implausible-low supply pressure'
			});
		}
		// else a hot bearing would be reported as a sensor fault, never as high temperature
		if (s.water_temp_max_c >= s.temp_plausible_max_c) {
			ctx.addIssue({
				code: 'custom',
				path: ['water_temp_max_c'],
				message: 'below the implausible-high temperature'
			});
		}
	});
export type AlarmSettings = z.infer<typeof alarmSettings>;

/**
 * Body of `PUT /api/shafts/{id}/alarm-settings`: any subset of the fields, no
 * defaults filled in (they would reset the fields not sent), unknown fields
 * refused so a misspelt name is an error instead of silently ignored.
 * Apply it with applyAlarmSettingsUpdate, which runs the cross-field checks.
 */
export const alarmSettingsUpdate = z
	.strictObject(shape((k) => numberField(ALARM_SETTING_FIELDS[k])))
	.partial();
export type AlarmSettingsUpdate = z.infer<typeof alarmSettingsUpdate>;

export const DEFAULT_ALARM_SETTINGS: AlarmSettings = Object.freeze(alarmSettings.parse({}));

/** The settings after an update, checked as a whole (zod's safeParse result). */
export function applyAlarmSettingsUpdate(current: AlarmSettings, update: AlarmSettingsUpdate) {
	return alarmSettings.safeParse({ ...current, ...update });
}

/**
 * On- and off-delay in seconds for the debouncer of each type. Sensor faults
 * trip at once (an implausible value is not a process excursion to wait out; a
 * frozen reading has already waited sensor_stuck_s) and clear with the flow
 * off-delay. Stale data, missed purges and a stuck purge valve are judged on
 * elapsed time by their own rules, so they pass straight through.
 */
export function debounceDelays(type: AlarmType, s: AlarmSettings): { on_s: number; off_s: number } {
	switch (type) {
		case 'low_flow':
		case 'low_flow_margin':
			return { on_s: s.low_flow_delay_s, off_s: s.low_flow_off_delay_s };
		case 'low_supply_pressure':
			return { on_s: s.supply_delay_s, off_s: s.supply_off_delay_s };
		case 'separator_dp_high':
			return { on_s: s.separator_dp_delay_s, off_s: s.separator_dp_off_delay_s };
		case 'water_temp_high':
			return { on_s: s.water_temp_delay_s, off_s: s.water_temp_off_delay_s };
		case 'sensor_fault':
			return { on_s: 0, off_s: s.low_flow_off_delay_s };
		case 'stale_data':
		case 'purge_missed':
		case 'purge_valve_stuck_open':
			return { on_s: 0, off_s: 0 };
	}
}
