import { describe, expect, it } from 'vitest';
import { minimumAt, minimumsDuring, minimumTimeline } from './minimums';

// Check values are worked by hand from the definitions in minimums.ts (a step function of time);
// the minimums themselves are Q_min = 0.15 L/min per mm × D (DESIGN.md §3, common practice):
// 300 mm → 45 L/min, 350 mm → 52.5 L/min, 400 mm → 60 L/min.
describe('minimum timeline', () => {
	it('with no change recorded, the current minimum has always applied', () => {
		const t = minimumTimeline([], 45);
		expect(minimumAt(t, -1e15)).toBe(45);
		expect(minimumAt(t, 1e15)).toBe(45);
		expect(minimumsDuring(t, 1000, 2000)).toEqual([{ from_ts: 1000, min_flow_lpm: 45 }]);
	});

	it('each change applies from its time on; before the first, its old value', () => {
		const t = minimumTimeline(
			[
				{ changed_at: 1000, from_lpm: 45, to_lpm: 52.5 },
				{ changed_at: 2000, from_lpm: 52.5, to_lpm: 60 }
			],
			60
		);
		expect(minimumAt(t, 999)).toBe(45);
		expect(minimumAt(t, 1000)).toBe(52.5);
		expect(minimumAt(t, 1999)).toBe(52.5);
		expect(minimumAt(t, 2000)).toBe(60);
		expect(minimumsDuring(t, 500, 1500)).toEqual([
			{ from_ts: 500, min_flow_lpm: 45 },
			{ from_ts: 1000, min_flow_lpm: 52.5 }
		]);
		expect(minimumsDuring(t, 1000, 2000)).toEqual([{ from_ts: 1000, min_flow_lpm: 52.5 }]);
		expect(minimumsDuring(t, 0, 3000).map((s) => s.min_flow_lpm)).toEqual([45, 52.5, 60]);
	});

	it('the current minimum wins over a last recorded value that differs', () => {
		const t = minimumTimeline([{ changed_at: 1000, from_lpm: 45, to_lpm: 52.5 }], 60);
		expect(minimumAt(t, 5000)).toBe(60);
		expect(minimumAt(t, 0)).toBe(45);
	});
});
