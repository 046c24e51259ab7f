/**
 * Water density and the hydrostatic pressure outside the stern tube.
 *
 * The supply to a water-lubricated bearing must be above the sea pressure at
 * the shaft centreline, or sea water (with its sand) is pushed in instead of
 * clean water flowing out. Gauge pressure there is p = ρ g h.
 */
import type { WaterKind } from './types';
import { PA_PER_BAR, STANDARD_GRAVITY } from './units';

/** kg/m³: typical surface sea water (range 1020–1029), common practice */
export const SEA_WATER_DENSITY = 1025;
/** kg/m³ */
export const FRESH_WATER_DENSITY = 1000;

/**
 * Density of sea water at one standard atmosphere (EOS-80), kg/m³.
 * UNESCO Technical Papers in Marine Science 44 (Fofonoff & Millard, 1983):
 * ρ(S, t, 0) = ρ_w + A·S + B·S^1.5 + C·S², t in °C (IPTS-68), S practical salinity.
 * Valid for 0 ≤ S ≤ 42 and −2 ≤ t ≤ 40 °C.
 */
export function densityEos80(salinityPsu: number, tempC: number): number {
	const t = tempC;
	const s = salinityPsu;
	const rhoW =
		999.842594 +
		t * (6.793952e-2 + t * (-9.09529e-3 + t * (1.001685e-4 + t * (-1.120083e-6 + t * 6.536332e-9))));
	const a = 8.24493e-1 + t * (-4.0899e-3 + t * (7.6438e-5 + t * (-8.2467e-7 + t * 5.3875e-9)));
	const b = -5.72466e-3 + t * (1.0227e-4 + t * -1.6546e-6);
	const c = 4.8314e-4;
	return rhoW + a * s + b * s * Math.sqrt(s) + c * s * s;
}

/**
 * The density to use for a shaft: EOS-80 when both the vessel's salinity and a
 * water temperature are known (and inside the equation's range), else the
 * customary 1025 kg/m³ for sea water and 1000 for fresh.
 */
export function waterDensity(
	water: WaterKind,
	options: { salinityPsu?: number | null; tempC?: number | null } = {}
): number {
	const { salinityPsu, tempC } = options;
	if (
		salinityPsu !== null &&
		salinityPsu !== undefined &&
		tempC !== null &&
		tempC !== undefined &&
		salinityPsu >= 0 &&
		salinityPsu <= 42 &&
		tempC >= -2 &&
		tempC <= 40
	) {
		return densityEos80(water === 'fresh' ? 0 : salinityPsu, tempC);
	}
	return water === 'fresh' ? FRESH_WATER_DENSITY : SEA_WATER_DENSITY;
}

/** Gauge pressure in Pa at `depthM` below the surface: p = ρ g h. */
export function hydrostaticPressurePa(depthM: number, densityKgM3: number): number {
	return densityKgM3 * STANDARD_GRAVITY * depthM;
}

/** Gauge sea pressure in bar at the shaft centreline. */
export function seaPressureAtCentreline(
	centrelineDepthM: number,
	water: WaterKind,
	options: { salinityPsu?: number | null; tempC?: number | null } = {}
): number {
	const depth = Math.max(0, centrelineDepthM);
	return hydrostaticPressurePa(depth, waterDensity(water, options)) / PA_PER_BAR;
}
