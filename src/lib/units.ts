/**
 * Units. Aftwater stores SI (L/min, mm, bar, °C, m) and converts only at the
 * edge, for display in the user's chosen system. Definitions are exact:
 * NIST SP 811 Appendix B (inch, US gallon), EU Directive 80/181/EEC (bar),
 * 3rd CGPM (standard gravity), and the avoirdupois pound (0.45359237 kg).
 */
import type { UnitSystem } from './types';

export const MM_PER_INCH = 25.4;
export const LITRES_PER_US_GALLON = 3.785411784;
export const GPM_PER_LPM = 1 / LITRES_PER_US_GALLON;
export const PA_PER_BAR = 100_000;
export const STANDARD_GRAVITY = 9.80665; // m/s²
/** lbf/in² in Pa: 0.45359237 kg × g_n / (0.0254 m)² */
export const PA_PER_PSI = (0.45359237 * STANDARD_GRAVITY) / (0.0254 * 0.0254);
export const FEET_PER_METRE = 1 / 0.3048;

export const lpmToGpm = (lpm: number) => lpm / LITRES_PER_US_GALLON;
export const gpmToLpm = (gpm: number) => gpm * LITRES_PER_US_GALLON;
export const mmToIn = (mm: number) => mm / MM_PER_INCH;
export const inToMm = (inch: number) => inch * MM_PER_INCH;
export const barToPsi = (bar: number) => (bar * PA_PER_BAR) / PA_PER_PSI;
export const psiToBar = (psi: number) => (psi * PA_PER_PSI) / PA_PER_BAR;
export const barToKpa = (bar: number) => bar * 100;
export const kpaToBar = (kpa: number) => kpa / 100;
export const cToF = (c: number) => (c * 9) / 5 + 32;
export const fToC = (f: number) => ((f - 32) * 5) / 9;
/** a temperature difference, not a temperature */
export const deltaCToF = (dc: number) => (dc * 9) / 5;
export const mToFt = (m: number) => m * FEET_PER_METRE;
export const ftToM = (ft: number) => ft / FEET_PER_METRE;

export type Quantity = 'flow' | 'length' | 'pressure' | 'temperature' | 'depth';

interface UnitDef {
	unit: string;
	/** from the SI value stored to the displayed value */
	toDisplay: (si: number) => number;
	/** from a value typed in the displayed unit to SI */
	fromDisplay: (display: number) => number;
	digits: number;
}

const identity = (v: number) => v;

const UNITS: Record<UnitSystem, Record<Quantity, UnitDef>> = {
	metric: {
		flow: { unit: 'L/min', toDisplay: identity, fromDisplay: identity, digits: 1 },
		length: { unit: 'mm', toDisplay: identity, fromDisplay: identity, digits: 0 },
		pressure: { unit: 'bar', toDisplay: identity, fromDisplay: identity, digits: 2 },
		temperature: { unit: '°C', toDisplay: identity, fromDisplay: identity, digits: 1 },
		depth: { unit: 'm', toDisplay: identity, fromDisplay: identity, digits: 2 }
	},
	us: {
		flow: { unit: 'gpm', toDisplay: lpmToGpm, fromDisplay: gpmToLpm, digits: 1 },
		length: { unit: 'in', toDisplay: mmToIn, fromDisplay: inToMm, digits: 2 },
		pressure: { unit: 'psi', toDisplay: barToPsi, fromDisplay: psiToBar, digits: 1 },
		temperature: { unit: '°F', toDisplay: cToF, fromDisplay: fToC, digits: 0 },
		depth: { unit: 'ft', toDisplay: mToFt, fromDisplay: ftToM, digits: 1 }
	}
};

export function unitOf(system: UnitSystem, quantity: Quantity): string {
	return UNITS[system][quantity].unit;
}

export function toDisplay(system: UnitSystem, quantity: Quantity, si: number): number {
	return UNITS[system][quantity].toDisplay(si);
}

export function fromDisplay(system: UnitSystem, quantity: Quantity, value: number): number {
	return UNITS[system][quantity].fromDisplay(value);
}

/** "123.4 L/min" or "32.6 gpm"; "—" for a missing value. */
export function formatQuantity(
	system: UnitSystem,
	quantity: Quantity,
	si: number | null | undefined,
	options: { digits?: number; unit?: boolean } = {}
): string {
	if (si === null || si === undefined || !Number.isFinite(si)) return '—';
	const def = UNITS[system][quantity];
	const digits = options.digits ?? def.digits;
	const text = def.toDisplay(si).toLocaleString('en-GB', {
		minimumFractionDigits: digits,
		maximumFractionDigits: digits
	});
	return options.unit === false ? text : `${text} ${def.unit}`;
}

/** "+23 %" for a margin of 0.23 */
export function formatMargin(margin: number | null | undefined): string {
	if (margin === null || margin === undefined || !Number.isFinite(margin)) return '—';
	const pct = Math.round(margin * 100);
	return `${pct > 0 ? '+' : pct < 0 ? '−' : ''}${Math.abs(pct)} %`;
}
