/**
 * Bearing bore and shaft (or liner) measurements: the running clearance is
 * the bore's diameter less the journal's, both measured at the same station.
 * The bearing maker sets the design clearance for the material and diameter
 * (water-lubricated polymer bearings swell in water, so the maker's figure
 * for the installed, soaked bearing governs) and the largest clearance
 * before renewal; Aftwater only compares the measurement with the figures
 * entered.
 */

export interface ClearanceInput {
	bore_mm: number;
	journal_mm: number;
	/** the maker's largest clearance before renewal, if known */
	max_clearance_mm?: number | null;
}

export interface ClearanceJudgement {
	clearance_mm: number;
	/** clearance ÷ journal diameter, per mille */
	per_mille: number;
	/** 'interference' when the bore is smaller than the journal */
	/** 'no_limit' when no renewal limit was entered to compare with */
	state: ClearanceState;
}

export type ClearanceState = 'ok' | 'no_limit' | 'over_limit' | 'interference';

export const CLEARANCE_STATE_WORDS: Record<ClearanceState, string> = {
	ok: 'Within limit',
	no_limit: 'No limit set',
	over_limit: 'Over the limit',
	interference: 'Bore smaller than journal'
};

export function runningClearance(input: ClearanceInput): ClearanceJudgement {
	const clearance = input.bore_mm - input.journal_mm;
	const state =
		clearance <= 0
			? 'interference'
			: input.max_clearance_mm == null
				? 'no_limit'
				: clearance > input.max_clearance_mm
					? 'over_limit'
					: 'ok';
	return { clearance_mm: clearance, per_mille: (clearance / input.journal_mm) * 1000, state };
}
