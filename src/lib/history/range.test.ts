import { describe, expect, it } from 'vitest';
import {
	autoBucket,
	DAY_MS,
	parseInstant,
	periodFromQuery,
	periodQuery,
	shiftPeriod,
	suggestedBucket,
	zoomPeriod
} from './range';

const HOUR = 3_600_000;

describe('parseInstant', () => {
	it('reads ISO 8601 with a zone designator and epoch ms', () => {
		// 2026-03-01T12:00:00Z = 1 772 366 400 000 ms (Date.UTC(2026, 2, 1, 12))
		expect(parseInstant('2026-03-01T12:00:00Z')).toBe(Date.UTC(2026, 2, 1, 12));
		// +01:00 is one hour ahead of UTC: 13:00+01:00 is 12:00Z
		expect(parseInstant('2026-03-01T13:00:00+01:00')).toBe(Date.UTC(2026, 2, 1, 12));
		expect(parseInstant('2026-03-01T13:00+0100')).toBe(Date.UTC(2026, 2, 1, 12));
		expect(parseInstant('2026-03-01T12:00:00.250Z')).toBe(Date.UTC(2026, 2, 1, 12) + 250);
		expect(parseInstant('1772366400000')).toBe(1_772_366_400_000);
	});

	it('refuses a time without a zone, and nonsense', () => {
		expect(parseInstant('2026-03-01T12:00:00')).toBeNull();
		expect(parseInstant('yesterday')).toBeNull();
		expect(parseInstant('2026-13-01T12:00:00Z')).toBeNull();
		expect(parseInstant('1.5')).toBeNull();
	});

	it('refuses epoch ms a Date cannot hold (ECMA-262: ±8.64e15 ms)', () => {
		expect(parseInstant('8640000000000000')).toBe(8.64e15);
		expect(new Date(8.64e15).toISOString()).toBe('+275760-09-13T00:00:00.000Z');
		expect(parseInstant('8640000000000001')).toBeNull();
		expect(parseInstant('-8640000000000001')).toBeNull();
	});
});

describe('autoBucket', () => {
	it('raw up to 3 h, 1-minute buckets up to 8 days, then 1-hour buckets', () => {
		expect(autoBucket(0, HOUR)).toBe('raw');
		expect(autoBucket(0, 3 * HOUR)).toBe('raw');
		expect(autoBucket(0, 3 * HOUR + 1)).toBe('1m');
		expect(autoBucket(0, DAY_MS)).toBe('1m');
		expect(autoBucket(0, 7 * DAY_MS)).toBe('1m');
		expect(autoBucket(0, 30 * DAY_MS)).toBe('1h');
		expect(autoBucket(0, 365 * DAY_MS)).toBe('1h');
	});
	it('suggests raw only up to a day', () => {
		expect(suggestedBucket(0, DAY_MS)).toBe('raw');
		expect(suggestedBucket(0, DAY_MS + 1)).toBe('1m');
		expect(suggestedBucket(0, 9 * DAY_MS)).toBe('1h');
	});
});

describe('periods in the URL', () => {
	const now = Date.UTC(2026, 5, 1);
	it('a preset ends now; fixed ends survive a round trip', () => {
		const p = periodFromQuery(new URLSearchParams('range=7d'), now);
		expect(p).toEqual({ from: now - 7 * DAY_MS, to: now, preset: '7d' });
		expect(periodQuery(p)).toEqual({ range: '7d' });
		const fixed = { from: Date.UTC(2026, 0, 1), to: Date.UTC(2026, 0, 2), preset: null };
		expect(periodFromQuery(new URLSearchParams(periodQuery(fixed)), now)).toEqual(fixed);
	});
	it('a mangled link falls back to the default preset', () => {
		expect(
			periodFromQuery(new URLSearchParams('from=2026-01-02T00:00Z&to=2026-01-01T00:00Z'), now)
				.preset
		).toBe('24h');
		expect(periodFromQuery(new URLSearchParams('range=forever'), now, '30d').preset).toBe('30d');
	});
});

describe('zoom and shift', () => {
	const now = 100 * HOUR;
	it('zooms about the middle and never past now', () => {
		// 10–20 h zoomed out ×2 → 5–25 h
		expect(zoomPeriod(10 * HOUR, 20 * HOUR, 2, now)).toEqual({ from: 5 * HOUR, to: 25 * HOUR });
		// 90–100 h ×2 would end at 105 h: held at now, start moved back by 5 h → 80–100 h
		expect(zoomPeriod(90 * HOUR, 100 * HOUR, 2, now)).toEqual({ from: 80 * HOUR, to: 100 * HOUR });
	});
	it('shifts by a share of the period', () => {
		expect(shiftPeriod(10 * HOUR, 20 * HOUR, -0.5, now)).toEqual({ from: 5 * HOUR, to: 15 * HOUR });
		expect(shiftPeriod(90 * HOUR, 98 * HOUR, 1, now)).toEqual({ from: 92 * HOUR, to: 100 * HOUR });
	});
});
