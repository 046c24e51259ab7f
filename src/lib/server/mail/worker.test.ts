import { describe, expect, it } from 'vitest';
import { backoffMs, isPermanent } from './worker';

describe('retry back-off', () => {
	it('doubles from the base and stops at the cap', () => {
		const waits = [1, 2, 3, 4, 7, 8, 9, 50, 5_000].map((n) => backoffMs(n, 5_000, 600_000));
		expect(waits).toEqual([
			5_000, 10_000, 20_000, 40_000, 320_000, 600_000, 600_000, 600_000, 600_000
		]);
	});
});

describe('permanent failures', () => {
	it('gives up at once only when the server refuses this message', () => {
		expect(isPermanent({ code: 'EENVELOPE', responseCode: 550 })).toBe(true);
		expect(isPermanent({ code: 'EMESSAGE', responseCode: 554 })).toBe(true);
		expect(isPermanent({ code: 'EENVELOPE', responseCode: 452 })).toBe(false); // 4xx: try later
		expect(isPermanent({ code: 'EAUTH', responseCode: 535 })).toBe(false); // configuration: fixable
		expect(isPermanent({ code: 'ESOCKET' })).toBe(false); // connection refused
		expect(isPermanent(new Error('boom'))).toBe(false);
	});
});
