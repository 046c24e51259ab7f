import { describe, expect, it } from 'vitest';
import {
	ALARM_SETTING_FIELDS,
	alarmSettings,
	alarmSettingsUpdate,
	applyAlarmSettingsUpdate,
	debounceDelays,
	DEFAULT_ALARM_SETTINGS as D
} from './settings';
import { ALARM_TYPES } from './types';

describe('defaults', () => {
	it('delays follow the ISA-18.2 (2009) guidance table [memory]', () => {
		// flow 15 s, pressure 15 s, temperature 60 s, on and off
		expect([D.low_flow_delay_s, D.low_flow_off_delay_s]).toEqual([15, 15]);
		expect([D.supply_delay_s, D.supply_off_delay_s]).toEqual([15, 15]);
		expect([D.water_temp_delay_s, D.water_temp_off_delay_s]).toEqual([60, 60]);
		expect(D.separator_dp_off_delay_s).toBe(15);
		// flow deadband 5 % (ISA-18.2 (2009) [memory])
		expect(D.flow_deadband).toBe(0.05);
	});

	it('the rest are the product’s own starting points', () => {
		expect(D).toMatchObject({
			margin_warning: 0.2,
			supply_margin_bar: 0.3,
			separator_dp_max_bar: 0.8,
			separator_dp_delay_s: 60,
			stale_after_s: 30,
			water_temp_max_c: 45, // recalled, not published: the bearing maker's limit governs
			running_rpm_min: 5,
			sensor_stuck_s: 300,
			flow_plausible_factor: 50,
			flow_plausible_max_lpm: 20_000,
			temp_plausible_min_c: -5,
			temp_plausible_max_c: 95,
			supply_plausible_min_bar: -1,
			supply_plausible_max_bar: 25
		});
	});

	it('are what the schema fills in for an empty object, and every field has a form label', () => {
		expect(alarmSettings.parse({})).toEqual(D);
		expect(Object.keys(ALARM_SETTING_FIELDS).sort()).toEqual(Object.keys(D).sort());
		for (const f of Object.values(ALARM_SETTING_FIELDS)) {
			expect(f.label.length).toBeGreaterThan(3);
			expect(f.unit.length).toBeGreaterThan(0);
			expect(f.min).toBeLessThanOrEqual(f.default);
			expect(f.default).toBeLessThanOrEqual(f.max);
		}
	});
});

describe('validation', () => {
	it.each([
		[{ low_flow_delay_s: -1 }, 'low_flow_delay_s'],
		[{ low_flow_delay_s: 3601 }, 'low_flow_delay_s'],
		[{ margin_warning: 2.5 }, 'margin_warning'],
		[{ supply_margin_bar: '0.3' }, 'supply_margin_bar'],
		[{ stale_after_s: 0 }, 'stale_after_s'],
		[{ water_temp_max_c: Number.NaN }, 'water_temp_max_c']
	])('refuses %o', (body, field) => {
		const r = alarmSettingsUpdate.safeParse(body);
		expect(r.success).toBe(false);
		expect(r.error?.issues[0].path).toEqual([field]);
	});

	it('a partial update fills in nothing and refuses unknown fields', () => {
		expect(alarmSettingsUpdate.parse({ low_flow_delay_s: 20 })).toEqual({ low_flow_delay_s: 20 });
		expect(alarmSettingsUpdate.parse({})).toEqual({});
		expect(alarmSettingsUpdate.safeParse({ low_flow_delay: 20 }).success).toBe(false);
	});

	it('stored settings with a retired field still read', () => {
		expect(alarmSettings.parse({ retired_field: 1 })).toEqual(D);
	});

	it('an update is checked as a whole, so every alarm can still sound', () => {
		const ok = applyAlarmSettingsUpdate(D, { water_temp_max_c: 50 });
		expect(ok.success && ok.data.water_temp_max_c).toBe(50);
		expect(ok.success && ok.data.low_flow_delay_s).toBe(15);
		// a high-temperature limit at or above the plausible ceiling could never sound
		const hot = applyAlarmSettingsUpdate(D, { water_temp_max_c: 95 });
		expect(hot.error?.issues[0].path).toEqual(['water_temp_max_c']);
		const range = applyAlarmSettingsUpdate(D, {
			supply_plausible_max_bar: 0,
			supply_plausible_min_bar: 0
		});
		expect(range.error?.issues[0].path).toEqual(['supply_plausible_max_bar']);
		const temps = applyAlarmSettingsUpdate(D, {
			temp_plausible_min_c: 10,
			temp_plausible_max_c: 10,
			water_temp_max_c: 5
		});
		expect(temps.error?.issues.map((i) => i.path[0])).toEqual(['temp_plausible_max_c']);
	});
});

describe('debounce delays per type', () => {
	it.each([
		['low_flow', 15, 15],
		['low_flow_margin', 15, 15],
		['low_supply_pressure', 15, 15],
		['separator_dp_high', 60, 15],
		['water_temp_high', 60, 60],
		['sensor_fault', 0, 15],
		['stale_data', 0, 0],
		['purge_missed', 0, 0],
		['purge_valve_stuck_open', 0, 0]
	] as const)('%s: on %s s, off %s s', (type, on, off) => {
		expect(debounceDelays(type, D)).toEqual({ on_s: on, off_s: off });
	});

	it('follow the settings', () => {
		const s = { ...D, low_flow_delay_s: 5, low_flow_off_delay_s: 30 };
		expect(debounceDelays('low_flow', s)).toEqual({ on_s: 5, off_s: 30 });
		expect(ALARM_TYPES.every((t) => debounceDelays(t, s).on_s >= 0)).toBe(true);
	});
});
