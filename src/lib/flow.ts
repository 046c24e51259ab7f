/**
 * The main computation of the product: how much clean water a water-lubricated
 * stern-tube bearing needs, and how far the measured flow is above it.
 *
 * Q_min = k × D, k = 0.15 L/min per mm of shaft diameter by default. This is
 * common practice in the trade, not a published figure; its US customary form
 * is 1 US gal/min per inch of diameter (0.149 L/min per mm — the two agree
 * within 1 %). The bearing maker's figure governs, so k is set per shaft.
 */
import { GPM_PER_LPM, MM_PER_INCH } from './units';

/** L/min per mm of shaft diameter (common practice; the bearing maker's figure governs) */
export const DEFAULT_MIN_FLOW_FACTOR_LPM_PER_MM = 0.15;

/** US gal/min per inch of shaft diameter: the same rule of thumb in US customary units */
export const US_MIN_FLOW_FACTOR_GPM_PER_IN = 1;

/** Minimum clean-water flow in L/min for a shaft of `diameterMm` at the bearing. */
export function minimumFlow(
	diameterMm: number,
	factorLpmPerMm: number = DEFAULT_MIN_FLOW_FACTOR_LPM_PER_MM
): number {
	return factorLpmPerMm * diameterMm;
}

/** The US customary form of the rule: 1 US gal/min per inch, returned in US gal/min. */
export function minimumFlowUsRule(diameterMm: number): number {
	return US_MIN_FLOW_FACTOR_GPM_PER_IN * (diameterMm / MM_PER_INCH);
}

/** The US customary rule, in L/min, for showing beside the metric minimum. */
export function minimumFlowUsRuleLpm(diameterMm: number): number {
	return minimumFlowUsRule(diameterMm) / GPM_PER_LPM;
}

/**
 * Flow margin (Q − Q_min) / Q_min: 0 at the minimum, 0.2 at 20 % above it,
 * negative below it. Undefined (null) when there is no positive minimum.
 */
export function flowMargin(flowLpm: number, minFlowLpm: number): number | null {
	if (!(minFlowLpm > 0) || !Number.isFinite(flowLpm)) return null;
	return (flowLpm - minFlowLpm) / minFlowLpm;
}
