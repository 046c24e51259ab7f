/**
 * Units a vessel's data logger may write, each with its conversion to the SI
 * unit Aftwater stores. The exact definitions are units.ts's (NIST SP 811
 * Appendix B for the US gallon and the inch, EU Directive 80/181/EEC for the
 * bar); m³/h and MPa follow from the SI prefixes.
 */
import { fToC, gpmToLpm, kpaToBar, psiToBar } from '../../units';

/** 1 m³/h = 1000 L / 60 min */
export const LPM_PER_M3H = 1000 / 60;
/** 1 MPa = 10⁶ Pa = 10 bar (1 bar = 10⁵ Pa) */
export const BAR_PER_MPA = 10;

export const m3hToLpm = (m3h: number) => m3h * LPM_PER_M3H;
export const mpaToBar = (mpa: number) => mpa * BAR_PER_MPA;

interface LoggerUnit {
	label: string;
	toSi: (v: number) => number;
}

export const FLOW_UNITS = {
	lpm: { label: 'L/min', toSi: (v: number) => v },
	gpm: { label: 'US gal/min', toSi: gpmToLpm },
	m3h: { label: 'm³/h', toSi: m3hToLpm }
} satisfies Record<string, LoggerUnit>;

export const PRESSURE_UNITS = {
	bar: { label: 'bar', toSi: (v: number) => v },
	kpa: { label: 'kPa', toSi: kpaToBar },
	psi: { label: 'psi', toSi: psiToBar },
	mpa: { label: 'MPa', toSi: mpaToBar }
} satisfies Record<string, LoggerUnit>;

export const TEMPERATURE_UNITS = {
	c: { label: '°C', toSi: (v: number) => v },
	f: { label: '°F', toSi: fToC }
} satisfies Record<string, LoggerUnit>;

export type FlowUnit = keyof typeof FLOW_UNITS;
export type PressureUnit = keyof typeof PRESSURE_UNITS;
export type TemperatureUnit = keyof typeof TEMPERATURE_UNITS;

export const FLOW_UNIT_KEYS = Object.keys(FLOW_UNITS) as [FlowUnit, ...FlowUnit[]];
export const PRESSURE_UNIT_KEYS = Object.keys(PRESSURE_UNITS) as [PressureUnit, ...PressureUnit[]];
export const TEMPERATURE_UNIT_KEYS = Object.keys(TEMPERATURE_UNITS) as [
	TemperatureUnit,
	...TemperatureUnit[]
];

const has = (text: string, ...needles: string[]) => needles.some((n) => text.includes(n));

/** The unit a column header names, if it names one: "Flow (gpm)", "P_kPa", "Temp °F". */
export function flowUnitFromHeader(header: string): FlowUnit | null {
	const h = header.toLowerCase().replace(/\s+/g, '');
	if (has(h, 'm3/h', 'm³/h', 'm^3/h', 'm3h', 'cbm/h')) return 'm3h';
	if (has(h, 'gpm', 'gal/min', 'usgal', 'gallon')) return 'gpm';
	if (has(h, 'l/min', 'lpm', 'l/m', 'litre', 'liter')) return 'lpm';
	return null;
}

export function pressureUnitFromHeader(header: string): PressureUnit | null {
	const h = header.toLowerCase();
	if (/\bkpa\b|_kpa|\(kpa\)|kpa/.test(h)) return 'kpa';
	if (/mpa/.test(h)) return 'mpa';
	if (/psi/.test(h)) return 'psi';
	if (/\bbar\b|_bar|\(bar\)|bar\)|bar$/.test(h)) return 'bar';
	return null;
}

export function temperatureUnitFromHeader(header: string): TemperatureUnit | null {
	const h = header.toLowerCase().trim();
	if (/°\s*f|deg\s*f|\(f\)|[_\s]f$|fahrenheit/.test(h)) return 'f';
	if (/°\s*c|deg\s*c|\(c\)|[_\s]c$|celsius/.test(h)) return 'c';
	return null;
}
