import { describe, expect, it } from 'vitest';
import { StuckDetector } from './stuck';

const STUCK_S = 300; // default sensor_stuck_s

/** One sample a second from t0 s; returns the times (s) at which the verdict changed. */
function feed(d: StuckDetector, flows: number[], turning: boolean, t0 = 0) {
	const changes: [number, boolean][] = [];
	let before = d.stuck;
	flows.forEach((q, i) => {
		const now = d.update((t0 + i) * 1000, q, turning);
		if (now !== before) changes.push([t0 + i, now]);
		before = now;
	});
	return changes;
}

const repeat = (q: number, n: number) => Array<number>(n).fill(q);
const noisy = (n: number) => Array.from({ length: n }, (_, i) => 70 + (i % 3) * 0.1);

describe('frozen flow reading (same value for sensor_stuck_s while the shaft turns)', () => {
	it('is frozen exactly 300 s after the value last changed', () => {
		const d = new StuckDetector(STUCK_S);
		expect(feed(d, repeat(70, 301), true)).toEqual([[300, true]]);
	});

	it('a live, changing reading never counts as frozen', () => {
		const d = new StuckDetector(STUCK_S);
		expect(feed(d, noisy(1000), true)).toEqual([]);
	});

	it('time with the shaft stopped does not count', () => {
		// 0 L/min for 20 min with the pump off in port is not a fault
		const d = new StuckDetector(STUCK_S);
		expect(feed(d, repeat(0, 1200), false)).toEqual([]);
		// once it turns, the 300 s start again from then
		expect(feed(d, repeat(0, 301), true, 1200)).toEqual([[1500, true]]);
	});

	it('clears only when the value changes again, even if the shaft stops', () => {
		const d = new StuckDetector(STUCK_S);
		feed(d, repeat(70, 301), true);
		// stopped for a minute, then turning again: the same value is still frozen
		expect(feed(d, repeat(70, 60), false, 301)).toEqual([]);
		expect(feed(d, repeat(70, 10), true, 361)).toEqual([]);
		expect(d.stuck).toBe(true);
		expect(feed(d, [70.1], false, 371)).toEqual([[371, false]]);
	});

	it('keeps its state as a plain object across a restart', () => {
		const d = new StuckDetector(STUCK_S);
		feed(d, repeat(70, 200), true);
		const saved = JSON.parse(JSON.stringify(d));
		expect(saved).toEqual({ value: 70, since: 0, stuck: false, last_at: 199_000 });
		expect(feed(new StuckDetector(STUCK_S, saved), repeat(70, 101), true, 200)).toEqual([
			[300, true]
		]);
	});
});
