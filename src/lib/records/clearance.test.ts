import { describe, expect, it } from 'vitest';
import { runningClearance } from './clearance';

describe('running clearance', () => {
	it('is bore less journal', () => {
		// hand-worked: 401.20 − 400.00 = 1.20 mm; 1.20 / 400 = 3.0 ‰
		const c = runningClearance({ bore_mm: 401.2, journal_mm: 400 });
		expect(c.clearance_mm).toBeCloseTo(1.2, 12);
		expect(c.per_mille).toBeCloseTo(3, 12);
		expect(c.state).toBe('no_limit');
	});

	it('flags a clearance over the maker’s limit and a bore smaller than the journal', () => {
		expect(runningClearance({ bore_mm: 402.5, journal_mm: 400, max_clearance_mm: 2 }).state).toBe(
			'over_limit'
		);
		expect(runningClearance({ bore_mm: 401.9, journal_mm: 400, max_clearance_mm: 2 }).state).toBe(
			'ok'
		);
		expect(runningClearance({ bore_mm: 399.9, journal_mm: 400 }).state).toBe('interference');
		expect(runningClearance({ bore_mm: 399.9, journal_mm: 400, max_clearance_mm: 2 }).state).toBe(
			'interference'
		);
	});
});
