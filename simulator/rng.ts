/**
 * A tiny seeded PRNG, so that a simulator run (and every unit test of it) can
 * be repeated exactly from its seed. Not for anything that needs secrecy.
 */

/** A source of uniform numbers in [0, 1). */
export type Rng = () => number;

/** mulberry32: 32-bit state, good enough spread for noise and scheduling. */
export function mulberry32(seed: number): Rng {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

/**
 * A sub-seed for one named part (vessel, shaft, noise stream), so adding a
 * vessel or sampling faster does not reshuffle every other part's numbers.
 * FNV-1a over the label, mixed with the run's seed.
 */
export function subSeed(seed: number, label: string): number {
	let h = (0x811c9dc5 ^ (seed >>> 0)) >>> 0;
	for (let i = 0; i < label.length; i++) {
		h ^= label.charCodeAt(i);
		h = Math.imul(h, 0x01000193) >>> 0;
	}
	return h;
}

export function uniform(rng: Rng, lo: number, hi: number): number {
	return lo + (hi - lo) * rng();
}

/** Standard normal deviate (Box–Muller; 1 − u keeps log away from 0). */
export function gaussian(rng: Rng): number {
	const u = 1 - rng();
	const v = rng();
	return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

/** True with probability p. */
export function chance(rng: Rng, p: number): boolean {
	return rng() < p;
}
