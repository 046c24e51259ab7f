import { describe, expect, it } from 'vitest';
import { sizeOverLimit } from './upload';

// MB here is 2^20 bytes (1 048 576), as the limits are set; the figures are worked by hand.
describe('sizeOverLimit', () => {
	it('never says a size over the limit as the limit itself', () => {
		// 21 000 000 B = 20.027 MB: one decimal would read "20.0 MB", two read 20.03
		expect(sizeOverLimit(21_000_000, 20 * 1_048_576)).toBe('20.03 MB; the limit is 20 MB');
		expect(sizeOverLimit(20 * 1_048_576 + 1, 20 * 1_048_576)).toBe('20.000001 MB; the limit is 20 MB');
		expect(sizeOverLimit(31_457_280, 20 * 1_048_576)).toBe('30.0 MB; the limit is 20 MB');
	});
});
