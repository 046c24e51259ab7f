/**
 * A frozen flow reading: exactly the same value for sensor_stuck_s while the
 * shaft turns. A live transmitter on moving water never repeats itself to the
 * last digit for minutes; a hung gateway input or a failed transmitter holding
 * its last value does, and would hide a real fall in flow.
 *
 * Only counted while the gateway reports the shaft turning: a stopped shaft's
 * pump is often off and reads a steady 0, and without a speed signal there is
 * no telling the two apart, so no verdict is given. Once frozen, the reading
 * stays frozen until it changes, even if the shaft stops meanwhile.
 */

/** Plain and JSON-safe, one per shaft. */
export interface StuckState {
	value: number | null;
	/** sample time (epoch ms) since which `value` has been seen unchanged while turning; null while stopped */
	since: number | null;
	stuck: boolean;
	last_at: number | null;
}

export const INITIAL_STUCK_STATE: Readonly<StuckState> = Object.freeze({
	value: null,
	since: null,
	stuck: false,
	last_at: null
});

export function stuckStep(
	state: StuckState,
	stuckAfterS: number,
	atMs: number,
	value: number,
	turning: boolean
): StuckState {
	if (!Number.isFinite(atMs) || !Number.isFinite(value)) return state;
	if (state.last_at !== null && atMs < state.last_at) return state;
	const since = turning ? atMs : null;
	if (value !== state.value) return { value, since, stuck: false, last_at: atMs };
	// the hold counts from the first sample turning, so time at rest never counts
	if (!turning || state.since === null) return { ...state, since, last_at: atMs };
	const stuck = state.stuck || atMs - state.since >= stuckAfterS * 1000;
	return { ...state, stuck, last_at: atMs };
}

export class StuckDetector {
	readonly stuckAfterS: number;
	#state: StuckState;

	constructor(stuckAfterS: number, state: StuckState = INITIAL_STUCK_STATE) {
		this.stuckAfterS = stuckAfterS;
		this.#state = { ...state };
	}

	/** Feeds one flow sample; true while the reading counts as frozen. */
	update(atMs: number, flowLpm: number, turning: boolean): boolean {
		this.#state = stuckStep(this.#state, this.stuckAfterS, atMs, flowLpm, turning);
		return this.#state.stuck;
	}

	get stuck(): boolean {
		return this.#state.stuck;
	}

	get state(): StuckState {
		return { ...this.#state };
	}

	toJSON(): StuckState {
		return this.state;
	}
}
