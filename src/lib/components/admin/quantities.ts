/**
 * Shaft and vessel figures as an administrator types them: in their own unit
 * system, turned into the SI the database keeps. Shared by the forms (live
 * figures as they type) and the form actions (what is stored), so the two
 * can never read a typed value differently.
 */
import { LITRES_PER_US_GALLON, MM_PER_INCH, fromDisplay, toDisplay, unitOf } from '$lib/units';
import type { UnitSystem } from '$lib/types';

/** What a configuration form asks for: a diameter, a depth, or a minimum-flow factor. */
export type InputKind = 'length' | 'depth' | 'factor';

/**
 * Shafts above about this diameter usually need forced (pumped) water
 * lubrication with a flow indicator. Marine-engineering teaching notes, not
 * confirmed in rule text: shown as guidance, never enforced.
 */
export const FORCED_LUBRICATION_GUIDANCE_MM = 380;

/** 1 US gal/min per inch in L/min per mm: 3.785411784 L / 25.4 mm = 0.14903196 */
export const LPM_PER_MM_PER_GPM_PER_IN = LITRES_PER_US_GALLON / MM_PER_INCH;

/** Digits an input keeps: 0.01 mm, 0.001 in, 1 mm of depth, 0.01 ft, 4 decimals of a factor. */
const INPUT_DIGITS: Record<UnitSystem, Record<InputKind, number>> = {
	metric: { length: 2, depth: 3, factor: 4 },
	us: { length: 3, depth: 2, factor: 4 }
};

export function inputUnit(system: UnitSystem, kind: InputKind): string {
	if (kind === 'factor') return system === 'us' ? 'gpm per in' : 'L/min per mm';
	return unitOf(system, kind);
}

/** SI → the number shown in the user's unit system. */
export function siToInput(system: UnitSystem, kind: InputKind, si: number): number {
	if (kind === 'factor') return system === 'us' ? si / LPM_PER_MM_PER_GPM_PER_IN : si;
	return toDisplay(system, kind, si);
}

/** A number typed in the user's unit system → SI, without float noise (6 significant digits). */
export function inputToSi(system: UnitSystem, kind: InputKind, typed: number): number {
	const si =
		kind === 'factor'
			? system === 'us'
				? typed * LPM_PER_MM_PER_GPM_PER_IN
				: typed
			: fromDisplay(system, kind, typed);
	// 12 in is 304.79999999999995 mm in binary floating point; 304.8 is what was meant
	return Number(si.toPrecision(6));
}

/** The text an input starts with for a stored SI value: "420", "16.535", "0.15". */
export function inputText(
	system: UnitSystem,
	kind: InputKind,
	si: number | null | undefined
): string {
	if (si === null || si === undefined || !Number.isFinite(si)) return '';
	const shown = siToInput(system, kind, si);
	return String(Number(shown.toFixed(INPUT_DIGITS[system][kind])));
}

/**
 * A typed decimal: "420", "16.5", ".5", or "16,5" with a decimal comma.
 * null for an empty field, NaN for anything that is not a plain number.
 */
export function parseDecimal(text: string | null | undefined): number | null {
	const t = (text ?? '').trim().replace(/\s/g, '');
	if (t === '') return null;
	const normalised =
		!t.includes('.') && (t.match(/,/g) ?? []).length === 1 ? t.replace(',', '.') : t;
	return /^[+-]?(\d+\.?\d*|\.\d+)$/.test(normalised) ? Number(normalised) : NaN;
}

/** Whether a typed value is the stored one as the form showed it (an edit that left it alone). */
export function unchanged(system: UnitSystem, kind: InputKind, typed: number, storedSi: number) {
	return typed === Number(inputText(system, kind, storedSi));
}
