/**
 * On-delay and off-delay with a deadband, so that a value hovering at its
 * setpoint does not chatter (ISA-18.2 (2009) guidance on delays and deadbands
 * [memory]).
 *
 * Driven by sample time, never the wall clock, so a replayed or late batch
 * judges the same as live data. The caller says for each sample whether the
 * raise condition holds (`tripping`, e.g. flow < minimum) and whether the clear
 * condition holds (`clearing`, e.g. flow ≥ minimum × 1.05); between the two lies
 * the deadband, where nothing changes and neither timer runs.
 */

/** Plain and JSON-safe, so the engine can keep one per (shaft, type) and persist it. */
export interface DebounceState {
	active: boolean;
	/** sample time (epoch ms) since which tripping has held without a break */
	trip_since: number | null;
	/** sample time since which clearing has held without a break */
	clear_since: number | null;
	/** the latest sample time seen */
	last_at: number | null;
}

export interface DebounceDelays {
	on_s: number;
	off_s: number;
}

export type DebounceOutput = 'raise' | 'clear' | null;

export const INITIAL_DEBOUNCE_STATE: Readonly<DebounceState> = Object.freeze({
	active: false,
	trip_since: null,
	clear_since: null,
	last_at: null
});

/** One step; returns the new state and what, if anything, happened. */
export function debounceStep(
	state: DebounceState,
	delays: DebounceDelays,
	atMs: number,
	tripping: boolean,
	clearing: boolean
): { state: DebounceState; output: DebounceOutput } {
	// An older sample cannot extend a hold measured up to a later one.
	if (!Number.isFinite(atMs) || (state.last_at !== null && atMs < state.last_at)) {
		return { state, output: null };
	}
	// Both at once means the caller's limits overlap; the raise side wins, failing safe.
	const clears = clearing && !tripping;
	const s: DebounceState = { ...state, last_at: atMs };
	if (!s.active) {
		s.clear_since = null;
		if (!tripping) return { state: { ...s, trip_since: null }, output: null };
		s.trip_since ??= atMs;
		if (atMs - s.trip_since < delays.on_s * 1000) return { state: s, output: null };
		return { state: { ...s, active: true, trip_since: null }, output: 'raise' };
	}
	s.trip_since = null;
	if (!clears) return { state: { ...s, clear_since: null }, output: null };
	s.clear_since ??= atMs;
	if (atMs - s.clear_since < delays.off_s * 1000) return { state: s, output: null };
	return { state: { ...s, active: false, clear_since: null }, output: 'clear' };
}

/**
 * The same as a small object. Delays are not part of the state: when settings
 * change, make a new Debouncer with the new delays from the old one's state.
 */
export class Debouncer {
	readonly delays: DebounceDelays;
	#state: DebounceState;

	constructor(delays: DebounceDelays, state: DebounceState = INITIAL_DEBOUNCE_STATE) {
		this.delays = { ...delays };
		this.#state = { ...state };
	}

	update(atMs: number, tripping: boolean, clearing: boolean): DebounceOutput {
		const { state, output } = debounceStep(this.#state, this.delays, atMs, tripping, clearing);
		this.#state = state;
		return output;
	}

	get active(): boolean {
		return this.#state.active;
	}

	/** A copy, to persist. */
	get state(): DebounceState {
		return { ...this.#state };
	}

	toJSON(): DebounceState {
		return this.state;
	}
}
