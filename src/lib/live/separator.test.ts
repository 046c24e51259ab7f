import { describe, expect, it } from 'vitest';
import { mergeSeparator } from './separator';

describe('mergeSeparator', () => {
	it('keeps the newest ΔP and valve state, each from the newest report that carried it', () => {
		const base = { ts: 1000, dp_bar: 0.31, purge_valve: 'closed' as const };
		expect(
			mergeSeparator(base, [
				[2000, 0.35, null], // ΔP only: the valve is as it was
				[3000, null, 'open'] // valve only: ΔP is as it was
			])
		).toEqual({ ts: 3000, dp_bar: 0.35, purge_valve: 'open' });
	});

	it('ignores a report older than what it has (a resumed stream repeats some)', () => {
		const base = { ts: 5000, dp_bar: 0.2, purge_valve: 'open' as const };
		expect(mergeSeparator(base, [[4000, 0.9, 'closed']])).toBe(base);
	});

	it('starts from nothing when the server had no report', () => {
		expect(mergeSeparator(null, [])).toBeNull();
		expect(mergeSeparator(null, [[10, null, 'closed']])).toEqual({ ts: 10, dp_bar: null, purge_valve: 'closed' });
	});
});
