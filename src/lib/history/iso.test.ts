import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { isoWriter } from './iso';

describe('isoWriter', () => {
	it('writes what Date#toISOString writes (property, 1970–9999)', () => {
		const iso = isoWriter();
		fc.assert(
			fc.property(fc.integer({ min: 0, max: 253_402_300_799_999 }), (ms) => {
				expect(iso(ms)).toBe(new Date(ms).toISOString());
			}),
			{ numRuns: 2000 }
		);
	});
	it('across a day boundary and on a leap day', () => {
		const iso = isoWriter();
		expect(iso(Date.UTC(2028, 1, 29, 23, 59, 59, 999))).toBe('2028-02-29T23:59:59.999Z');
		expect(iso(Date.UTC(2028, 2, 1))).toBe('2028-03-01T00:00:00.000Z');
		expect(iso(Date.UTC(2028, 1, 29, 0, 0, 0, 7))).toBe('2028-02-29T00:00:00.007Z');
	});
});
