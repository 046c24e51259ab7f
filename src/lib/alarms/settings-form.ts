/**
 * The alarm settings form in the user's units: each stored SI value shown as
 * text, and typed text turned back into SI. Only the fields whose text changed
 * are sent, so a value shown rounded (psi, °F) is never written back rounded.
 */
import { fromDisplay, toDisplay, unitOf } from '$lib/units';
import type { UnitSystem } from '$lib/types';
import { ALARM_SETTING_FIELDS, type AlarmSettings } from './settings';

export type SettingKey = keyof typeof ALARM_SETTING_FIELDS;
export const SETTING_KEYS = Object.keys(ALARM_SETTING_FIELDS) as SettingKey[];

/** the settings that belong to a vessel's separator rather than to a shaft */
export const SEPARATOR_SETTING_KEYS = SETTING_KEYS.filter((k) => k.startsWith('separator_'));
export const SHAFT_SETTING_KEYS = SETTING_KEYS.filter((k) => !k.startsWith('separator_'));

const round = (v: number) => String(Number(v.toFixed(4)));

export function displayUnit(key: SettingKey, units: UnitSystem): string {
	const f = ALARM_SETTING_FIELDS[key];
	return f.quantity ? unitOf(units, f.quantity) : f.unit;
}

export function toFormValue(key: SettingKey, value: number, units: UnitSystem): string {
	const f = ALARM_SETTING_FIELDS[key];
	if (f.unit === '%') return round(value * 100);
	return round(f.quantity ? toDisplay(units, f.quantity, value) : value);
}

export function fromFormValue(key: SettingKey, text: string, units: UnitSystem): number {
	const f = ALARM_SETTING_FIELDS[key];
	const v = Number(text.trim().replace(',', '.'));
	if (text.trim() === '' || !Number.isFinite(v)) return Number.NaN;
	if (f.unit === '%') return v / 100;
	return f.quantity ? fromDisplay(units, f.quantity, v) : v;
}

/** The changed fields, in SI, or the fields that are not numbers. */
export function changedSettings(form: FormData, current: AlarmSettings, units: UnitSystem, keys: SettingKey[] = SETTING_KEYS) {
	const update: Partial<Record<SettingKey, number>> = {};
	const errors: Record<string, string> = {};
	for (const key of keys) {
		const text = form.get(key);
		if (typeof text !== 'string' || text === toFormValue(key, current[key], units)) continue;
		const v = fromFormValue(key, text, units);
		if (Number.isNaN(v)) errors[key] = 'a number';
		else update[key] = v;
	}
	return { update, errors };
}
