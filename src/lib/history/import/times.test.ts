import { describe, expect, it } from 'vitest';
import { detectTimeFormat, TimeReader } from './times';

const ok = (r: ReturnType<TimeReader['read']>) => {
	if (!r.ok) throw new Error(r.message);
	return r;
};

describe('TimeReader: naive times in a stated zone', () => {
	it('reads wall-clock time in the zone, with its offset of the season', () => {
		const oslo = new TimeReader('iso', 'Europe/Oslo');
		// Norway keeps CET (UTC+1) in winter and CEST (UTC+2) in summer (EU Directive 2000/84/EC)
		expect(ok(oslo.read('2026-01-15 12:00:00')).ts).toBe(Date.UTC(2026, 0, 15, 11));
		expect(ok(oslo.read('2026-07-15 12:00:00')).ts).toBe(Date.UTC(2026, 6, 15, 10));
		expect(ok(oslo.read('2026-07-15T12:00:00.250')).ts).toBe(Date.UTC(2026, 6, 15, 10) + 250);
	});

	it('uses a time with an offset as given, whatever the zone', () => {
		const chicago = new TimeReader('iso', 'America/Chicago');
		const r = ok(chicago.read('2026-01-15T12:00:00Z'));
		expect(r.ts).toBe(Date.UTC(2026, 0, 15, 12));
		expect(r.offsetGiven).toBe(true);
		expect(ok(chicago.read('2026-01-15 14:00:00+02:00')).ts).toBe(Date.UTC(2026, 0, 15, 12));
	});

	it('refuses a wall-clock time the clocks skipped, and takes the first of a repeated one', () => {
		const oslo = new TimeReader('iso', 'Europe/Oslo');
		// EU summer time begins 2026-03-29 at 01:00 UTC: local 02:00 jumps to 03:00 (Directive 2000/84/EC)
		const skipped = oslo.read('2026-03-29 02:30:00');
		expect(skipped.ok).toBe(false);
		expect(ok(oslo.read('2026-03-29 03:00:00')).ts).toBe(Date.UTC(2026, 2, 29, 1));
		// it ends 2026-10-25 at 01:00 UTC: local 02:30 happens at 00:30 UTC (CEST) and again at 01:30 UTC (CET)
		const twice = ok(oslo.read('2026-10-25 02:30:00'));
		expect(twice.ts).toBe(Date.UTC(2026, 9, 25, 0, 30));
		expect(twice.ambiguous).toBe(true);
		expect(ok(oslo.read('2026-10-25 03:30:00')).ambiguous).toBe(false);
	});

	it('US rules in Chicago: the second Sunday of March 2026 skips 02:00–03:00 (Energy Policy Act of 2005)', () => {
		const chicago = new TimeReader('mdy', 'America/Chicago');
		expect(chicago.read('03/08/2026 2:30:00 AM').ok).toBe(false);
		// 1:59 AM CST is UTC−6
		expect(ok(chicago.read('03/08/2026 1:59:00 AM')).ts).toBe(Date.UTC(2026, 2, 8, 7, 59));
		// 12 PM is noon; CDT (UTC−5) from then on
		expect(ok(chicago.read('03/08/2026 12:00 PM')).ts).toBe(Date.UTC(2026, 2, 8, 17));
	});

	it('day-first and epoch formats', () => {
		const utc = new TimeReader('dmy', 'UTC');
		expect(ok(utc.read('29.03.2026 14:05')).ts).toBe(Date.UTC(2026, 2, 29, 14, 5));
		expect(ok(utc.read('29/03/2026 14:05:07')).ts).toBe(Date.UTC(2026, 2, 29, 14, 5, 7));
		expect(utc.read('31/02/2026 10:00').ok).toBe(false); // no 31 February
		expect(utc.read('2026-03-29 14:05').ok).toBe(false); // year first is not day first
		expect(ok(new TimeReader('epoch_s', 'UTC').read('1772366400')).ts).toBe(1_772_366_400_000);
		expect(ok(new TimeReader('epoch_ms', 'UTC').read('1772366400123')).ts).toBe(1_772_366_400_123);
	});

	it('refuses an unknown zone', () => {
		expect(() => new TimeReader('iso', 'Mars/Olympus')).toThrow(/unknown time zone/);
	});
});

describe('detectTimeFormat', () => {
	it('tells day-first from month-first once a day above 12 appears', () => {
		expect(detectTimeFormat(['01/02/2026 10:00', '13/02/2026 10:00'])).toEqual({
			format: 'dmy',
			ambiguous: false
		});
		expect(detectTimeFormat(['02/01/2026 10:00', '02/13/2026 10:00'])).toEqual({
			format: 'mdy',
			ambiguous: false
		});
		expect(detectTimeFormat(['01/02/2026 10:00'])).toEqual({ format: 'dmy', ambiguous: true });
		expect(detectTimeFormat(['2026-02-01T10:00:00Z'])).toEqual({ format: 'iso', ambiguous: false });
		expect(detectTimeFormat(['1772366400'])).toEqual({ format: 'epoch_s', ambiguous: false });
		expect(detectTimeFormat(['1772366400000'])).toEqual({ format: 'epoch_ms', ambiguous: false });
		expect(detectTimeFormat(['flow', '12'])).toBeNull();
	});
});
