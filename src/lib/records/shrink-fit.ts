/**
 * Shrink-fit planning for a shaft liner: how much hotter than the shaft the
 * liner must be to slide on. The bore must grow by the diametral interference
 * plus an assembly clearance, so ΔT = (δ + c) / (α · d) — the shrink-fit
 * relation of the Engineering ToolBox shrink-fit page. α is the liner's
 * linear expansion coefficient near room temperature (Callister,
 * Fundamentals of Materials Science and Engineering, Appendix B, Table B.6).
 *
 * The same relation estimates cooling the inner part (e.g. in liquid
 * nitrogen), but α falls at low temperature (NBS Monograph 29, 1961), so a
 * room-temperature α overstates the shrink: the estimate is not offered for
 * cooling.
 */

export interface Material {
	id: string;
	label: string;
	/** linear expansion coefficient, 1/K */
	alpha_per_k: number;
}

/** Callister, Appendix B, Table B.6 (from the ASM handbooks), 10⁻⁶/K × 1e-6 */
export const MATERIALS: readonly Material[] = [
	{ id: 'bronze_c93200', label: 'Bearing bronze (C93200)', alpha_per_k: 18.0e-6 },
	{ id: 'steel_1020', label: 'Plain carbon steel (1020)', alpha_per_k: 11.7e-6 },
	{ id: 'steel_4140', label: 'Alloy steel (4140)', alpha_per_k: 12.3e-6 },
	{ id: 'stainless_316', label: 'Stainless steel (316)', alpha_per_k: 15.9e-6 }
];

/** Liners are usually heated to about 300 °C before sliding on (common practice). */
export const USUAL_LINER_HEAT_C = 300;

/** Old shop allowance for shrink fits: about 0.001 in per inch of diameter (common practice). */
export const SHOP_INTERFERENCE_PER_DIAMETER = 0.001;

export interface ShrinkFitInput {
	/** bore of the liner (≈ the shaft diameter), mm */
	bore_mm: number;
	/** diametral interference, mm */
	interference_mm: number;
	/** diametral clearance wanted for sliding it on, mm */
	assembly_clearance_mm: number;
	alpha_per_k: number;
	/** the shaft's (and workshop's) temperature, °C */
	ambient_c: number;
}

export interface ShrinkFitPlan {
	/** how much hotter than the shaft the liner must be, K */
	delta_k: number;
	/** the liner temperature to reach, °C */
	heat_to_c: number;
	/** the bore's growth at that temperature, mm (= δ + c) */
	bore_growth_mm: number;
	/** interference ÷ diameter, to compare with the shop allowance of 0.001 */
	interference_ratio: number;
	/** plain-language cautions specific to this plan */
	notes: string[];
}

export function shrinkFitDeltaK(
	input: Pick<
		ShrinkFitInput,
		'bore_mm' | 'interference_mm' | 'assembly_clearance_mm' | 'alpha_per_k'
	>
): number {
	return (
		(input.interference_mm + input.assembly_clearance_mm) / (input.alpha_per_k * input.bore_mm)
	);
}

export function planShrinkFit(input: ShrinkFitInput): ShrinkFitPlan {
	const delta = shrinkFitDeltaK(input);
	const heatTo = input.ambient_c + delta;
	const ratio = input.interference_mm / input.bore_mm;
	const notes: string[] = [];
	if (heatTo > USUAL_LINER_HEAT_C + 50)
		notes.push(
			`${Math.round(heatTo)} °C is well above the usual ≈ ${USUAL_LINER_HEAT_C} °C: check the interference and the liner maker's limit before heating`
		);
	if (ratio > 2 * SHOP_INTERFERENCE_PER_DIAMETER)
		notes.push(
			'the interference is more than twice the old shop allowance of 0.001 per unit of diameter: check the drawing'
		);
	if (input.assembly_clearance_mm <= 0)
		notes.push(
			'with no assembly clearance the liner seizes as soon as it touches the cooler shaft: allow some'
		);
	return {
		delta_k: delta,
		heat_to_c: heatTo,
		bore_growth_mm: input.interference_mm + input.assembly_clearance_mm,
		interference_ratio: ratio,
		notes
	};
}
