/**
 * Vessel and shaft forms → the fleet service's SI input. Numbers are typed in
 * the unit system the form was shown in (a hidden `units` field says which:
 * the user may have switched units in another tab since the page loaded) and
 * converted here with the same functions the form's live figures use.
 */
import type { z } from 'zod';
import { fieldErrors } from '$lib/server/api/errors';
import type { Shaft } from '$lib/server/fleet/repository';
import {
	shaftCreate,
	shaftUpdate,
	vesselCreate,
	vesselUpdate,
	type ShaftCreate,
	type ShaftUpdate,
	type VesselCreate,
	type VesselUpdate
} from '$lib/schemas/fleet';
import { UNIT_SYSTEMS, type UnitSystem } from '$lib/types';
import { formatQuantity } from '$lib/units';
import { DEFAULT_MIN_FLOW_FACTOR_LPM_PER_MM as DEFAULT_FACTOR } from '$lib/flow';
import {
	inputToSi,
	inputUnit,
	parseDecimal,
	unchanged,
	type InputKind
} from '$lib/components/admin/quantities';

import type { Errors, Values } from '$lib/components/admin/types';

export type Parsed<T> =
	{ ok: true; data: T; values: Values } | { ok: false; values: Values; errors: Errors };

const text = (form: FormData, name: string) => {
	const v = form.get(name);
	return typeof v === 'string' ? v : '';
};

export function formUnits(form: FormData, fallback: UnitSystem): UnitSystem {
	const u = text(form, 'units');
	return (UNIT_SYSTEMS as readonly string[]).includes(u) ? (u as UnitSystem) : fallback;
}

function finish<S extends z.ZodType>(
	schema: S,
	raw: Record<string, unknown>,
	values: Values,
	errors: Errors,
	messages: Record<string, string> = {}
): Parsed<z.infer<S>> {
	const parsed = schema.safeParse(raw);
	if (!parsed.success) {
		for (const [key, message] of Object.entries(fieldErrors(parsed.error))) {
			errors[key] ??= messages[key] ?? message;
		}
	}
	if (Object.keys(errors).length || !parsed.success) return { ok: false, values, errors };
	return { ok: true, data: parsed.data, values };
}

/**
 * An update carries only the fields the form gave. The update schemas are the
 * create schemas made partial, and zod 4 still fills a partial field's default
 * in: without this, leaving a shaft's depth as shown would reset it to 0 m.
 */
function onlyGiven<T extends object>(parsed: Parsed<T>, raw: Record<string, unknown>): Parsed<T> {
	if (!parsed.ok) return parsed;
	const data = Object.fromEntries(
		Object.entries(parsed.data).filter(([key]) => raw[key] !== undefined)
	) as T;
	return { ...parsed, data };
}

// ---- vessels ----

const VESSEL_FIELDS = ['code', 'name', 'kind', 'time_zone', 'salinity_psu'] as const;

function vesselRaw(form: FormData, errors: Errors) {
	const values: Values = Object.fromEntries(VESSEL_FIELDS.map((f) => [f, text(form, f)]));
	const salinity = parseDecimal(values.salinity_psu);
	if (Number.isNaN(salinity)) errors.salinity_psu = 'a number, such as 35';
	const raw = {
		name: values.name,
		kind: values.kind.trim() === '' ? null : values.kind,
		time_zone: values.time_zone.trim() === '' ? 'UTC' : values.time_zone,
		salinity_psu: salinity === null || Number.isNaN(salinity) ? null : salinity
	};
	return { values, raw };
}

const VESSEL_MESSAGES = { salinity_psu: 'from 0 to 42 PSU (sea water is about 35), or empty' };

export function vesselCreateForm(form: FormData): Parsed<VesselCreate> {
	const errors: Errors = {};
	const { values, raw } = vesselRaw(form, errors);
	return finish(vesselCreate, { ...raw, code: values.code }, values, errors, VESSEL_MESSAGES);
}

export function vesselUpdateForm(form: FormData): Parsed<VesselUpdate> {
	const errors: Errors = {};
	const { values, raw } = vesselRaw(form, errors);
	return onlyGiven(finish(vesselUpdate, raw, values, errors, VESSEL_MESSAGES), raw);
}

// ---- shafts ----

/** form field (typed in display units) → service field (SI) */
const NUMBER_FIELDS: { field: string; key: keyof Shaft & keyof ShaftCreate; kind: InputKind }[] = [
	{ field: 'diameter', key: 'diameter_mm', kind: 'length' },
	{ field: 'centreline_depth', key: 'centreline_depth_m', kind: 'depth' },
	{ field: 'min_flow_factor', key: 'min_flow_factor_lpm_per_mm', kind: 'factor' }
];

/** The schema's limits, said in the units the form was typed in. */
function shaftMessages(units: UnitSystem): Errors {
	const factorMax = units === 'us' ? '33.5 gpm per in (5 L/min per mm)' : '5 L/min per mm';
	return {
		diameter_mm: `above ${formatQuantity(units, 'length', 20)} and below ${formatQuantity(units, 'length', 2000)}, at the bearing`,
		centreline_depth_m: `from 0 to ${formatQuantity(units, 'depth', 40, { digits: 0 })} below the waterline`,
		min_flow_factor_lpm_per_mm: `above 0 and at most ${factorMax}`
	};
}

/**
 * A number left as the form showed it keeps the value behind it exactly: in US
 * units 420 mm shows as 16.535 in, which reads back as 419.9989 mm, and editing
 * only a shaft's name must not move its diameter (or write that move to the
 * audit log). For a new shaft the same holds for the factor's default.
 */
function shaftRaw(form: FormData, units: UnitSystem, errors: Errors, before?: Shaft) {
	const values: Values = {
		code: text(form, 'code'),
		name: text(form, 'name'),
		position: text(form, 'position'),
		water: text(form, 'water')
	};
	const raw: Record<string, unknown> = {
		name: values.name,
		position: values.position || undefined,
		water: values.water || undefined
	};
	for (const { field, key, kind } of NUMBER_FIELDS) {
		values[field] = text(form, field);
		const typed = parseDecimal(values[field]);
		if (typed === null) {
			// the factor has a default (common practice); a diameter and a depth do not
			if (kind !== 'factor' || before) errors[key] = 'required';
		} else if (Number.isNaN(typed)) {
			errors[key] = `a number in ${inputUnit(units, kind)}`;
		} else {
			const shown = before ? (before[key] as number) : kind === 'factor' ? DEFAULT_FACTOR : null;
			if (shown === null || !unchanged(units, kind, typed, shown)) {
				raw[key] = inputToSi(units, kind, typed);
			} else if (!before) {
				raw[key] = shown;
			}
		}
	}
	values.units = units;
	return { values, raw };
}

export function shaftCreateForm(form: FormData, fallbackUnits: UnitSystem): Parsed<ShaftCreate> {
	const units = formUnits(form, fallbackUnits);
	const errors: Errors = {};
	const { values, raw } = shaftRaw(form, units, errors);
	return finish(shaftCreate, { ...raw, code: values.code }, values, errors, shaftMessages(units));
}

export function shaftUpdateForm(
	form: FormData,
	fallbackUnits: UnitSystem,
	before: Shaft
): Parsed<ShaftUpdate> {
	const units = formUnits(form, fallbackUnits);
	const errors: Errors = {};
	const { values, raw } = shaftRaw(form, units, errors, before);
	return onlyGiven(finish(shaftUpdate, raw, values, errors, shaftMessages(units)), raw);
}
