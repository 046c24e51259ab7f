/**
 * The records forms, read into the API's bodies: numbers typed in the user's
 * units become SI, a date becomes the ISO day, the seal test's readings come
 * from a pasted table ("seconds, pressure" per line). What cannot be read is
 * passed on as it is, so the API's zod schema names the field at fault.
 */
import { fromDisplay, type Quantity } from '$lib/units';
import type { UnitSystem } from '$lib/types';

type Fields = Record<string, FormDataEntryValue | null | undefined>;

export function formFields(form: FormData): Fields {
	return Object.fromEntries(form.entries());
}

const text = (v: FormDataEntryValue | null | undefined) => (typeof v === 'string' ? v.trim() : '');

/** a number typed in the user's units, in SI; '' → undefined, unreadable → the text (the schema refuses it) */
export function quantity(
	v: FormDataEntryValue | null | undefined,
	units: UnitSystem,
	q: Quantity | null
): number | string | undefined {
	const s = text(v).replace(',', '.');
	if (s === '') return undefined;
	const n = Number(s);
	if (!Number.isFinite(n)) return s;
	return q ? fromDisplay(units, q, n) : n;
}

/** a date input's day (YYYY-MM-DD), read by the schema as that day at 00:00 UTC */
function day(v: FormDataEntryValue | null | undefined): string {
	return text(v);
}

export interface ReadingsParse {
	readings: { t_s: number; pressure_bar: number }[];
	/** lines that are not "seconds, pressure" */
	bad_lines: number[];
}

/**
 * "0, 3.00" / "30 3.00" / "1:30 2.99" per line: time since the start (seconds,
 * or m:ss) and the gauge pressure in the user's unit. Blank lines and a header
 * line are skipped.
 */
export function parseReadings(input: string, units: UnitSystem): ReadingsParse {
	const readings: ReadingsParse['readings'] = [];
	const bad: number[] = [];
	input.split(/\r?\n/).forEach((line, i) => {
		const l = line.trim();
		if (!l) return;
		const parts = l.split(/[\s,;\t]+/).filter(Boolean);
		if (parts.length !== 2) {
			if (i === 0 && /[a-z]/i.test(l)) return; // a header
			bad.push(i + 1);
			return;
		}
		const t = parseTime(parts[0]);
		const p = Number(parts[1]);
		if (t === null || !Number.isFinite(p)) {
			if (i === 0 && /[a-z]/i.test(l)) return;
			bad.push(i + 1);
			return;
		}
		readings.push({ t_s: t, pressure_bar: fromDisplay(units, 'pressure', p) });
	});
	return { readings, bad_lines: bad };
}

function parseTime(s: string): number | null {
	const m = /^(\d+):([0-5]\d)$/.exec(s);
	if (m) return Number(m[1]) * 60 + Number(m[2]);
	const n = Number(s);
	return Number.isFinite(n) ? n : null;
}

export function sealTestFromForm(f: Fields, units: UnitSystem) {
	const parsed = parseReadings(text(f.readings), units);
	return {
		body: {
			seal: text(f.seal) || undefined,
			tested_at: day(f.tested_at),
			test_pressure_bar: quantity(f.test_pressure, units, 'pressure'),
			hold_s: quantity(f.hold_min, units, null) === undefined ? undefined : minutes(f.hold_min),
			resolution_bar: quantity(f.resolution, units, 'pressure'),
			leak_seen: f.leak_seen === 'on' || f.leak_seen === 'true',
			readings: parsed.readings,
			notes: text(f.notes)
		},
		bad_lines: parsed.bad_lines
	};
}

function minutes(v: FormDataEntryValue | null | undefined): number | string {
	const n = Number(text(v).replace(',', '.'));
	return Number.isFinite(n) ? Math.round(n * 60) : text(v);
}

export function bearingFromForm(f: Fields, units: UnitSystem) {
	return {
		bearing: text(f.bearing) || undefined,
		measured_at: day(f.measured_at),
		bore_mm: quantity(f.bore, units, 'length'),
		journal_mm: quantity(f.journal, units, 'length'),
		max_clearance_mm: quantity(f.max_clearance, units, 'length') ?? null,
		notes: text(f.notes)
	};
}

export function wearFromForm(f: Fields, units: UnitSystem) {
	return {
		measured_at: day(f.measured_at),
		reading_mm: quantity(f.reading, units, 'length'),
		method: text(f.method) || undefined,
		notes: text(f.notes)
	};
}

export function wearLimitFromForm(f: Fields, units: UnitSystem) {
	return { wear_limit_mm: quantity(f.wear_limit, units, 'length'), reason: text(f.reason) };
}

export function shrinkFitFromForm(f: Fields, units: UnitSystem) {
	const alpha = quantity(f.alpha_e6, units, null);
	return {
		bore_mm: quantity(f.bore, units, 'length'),
		interference_mm: quantity(f.interference, units, 'length'),
		assembly_clearance_mm: quantity(f.assembly_clearance, units, 'length'),
		material: text(f.material),
		// typed in 10⁻⁶ per kelvin whatever the unit system (handbooks give α per K; per °F is 5/9 of it)
		alpha_per_k: typeof alpha === 'number' ? alpha * 1e-6 : alpha,
		ambient_c: quantity(f.ambient, units, 'temperature'),
		notes: text(f.notes)
	};
}

/** The API's field names back to the form's, so an error shows beside the right input. */
export const FORM_FIELD_OF: Record<string, string> = {
	test_pressure_bar: 'test_pressure',
	hold_s: 'hold_min',
	resolution_bar: 'resolution',
	bore_mm: 'bore',
	journal_mm: 'journal',
	max_clearance_mm: 'max_clearance',
	reading_mm: 'reading',
	wear_limit_mm: 'wear_limit',
	interference_mm: 'interference',
	assembly_clearance_mm: 'assembly_clearance',
	alpha_per_k: 'alpha_e6',
	ambient_c: 'ambient'
};

export function toFormErrors(fields: Record<string, string>): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, v] of Object.entries(fields)) {
		const top = k.split('.')[0];
		out[FORM_FIELD_OF[top] ?? top] ??= v;
	}
	return out;
}
