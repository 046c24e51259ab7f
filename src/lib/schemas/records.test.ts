import { describe, expect, it } from 'vitest';
import { wearReadingBody } from './records';

// Calendar facts from ISO 8601 (the Gregorian calendar): February 2026 has 28 days, April 30.
const at = (measured_at: unknown) => wearReadingBody.shape.measured_at.safeParse(measured_at);

describe('times of records', () => {
	it('takes a date, an ISO time with a zone, or epoch ms', () => {
		expect(at('2026-03-02').data).toBe(Date.UTC(2026, 2, 2));
		expect(at('2026-03-02T10:00:00+02:00').data).toBe(Date.UTC(2026, 2, 2, 8));
		expect(at(Date.UTC(2026, 2, 2)).data).toBe(Date.UTC(2026, 2, 2));
	});

	it('refuses a day the month does not have, rather than rolling it into the next month', () => {
		expect(at('2026-02-30').success).toBe(false);
		expect(at('2026-04-31T10:00:00+02:00').success).toBe(false);
		expect(at('2026-02-29').success).toBe(false); // 2026 is not a leap year
		expect(at('2024-02-29').data).toBe(Date.UTC(2024, 1, 29)); // 2024 is
	});

	it('refuses a time without a zone, and epoch seconds', () => {
		expect(at('2026-03-02T10:00:00').success).toBe(false);
		expect(at(1_772_409_600).success).toBe(false);
	});
});
