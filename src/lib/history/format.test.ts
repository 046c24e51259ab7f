import { describe, expect, it } from 'vitest';
import { formatBoth, formatDuration, formatShare, formatZoned, tickLabels } from './format';

describe('formatZoned / formatBoth', () => {
	it('writes the vessel clock and UTC', () => {
		const t = Date.UTC(2026, 6, 15, 10, 5, 7); // 10:05:07Z; Oslo keeps CEST (UTC+2) in July
		expect(formatZoned(t, 'Europe/Oslo')).toBe('2026-07-15 12:05:07');
		expect(formatBoth(t, 'Europe/Oslo')).toBe('2026-07-15 12:05:07 (Europe/Oslo) · 10:05:07 UTC');
		// Singapore is UTC+8: 20:00Z is 04:00 the next day there, so the UTC date is written out
		expect(formatBoth(Date.UTC(2026, 0, 1, 20), 'Asia/Singapore', { seconds: false })).toBe(
			'2026-01-02 04:00 (Asia/Singapore) · 2026-01-01 20:00 UTC'
		);
		expect(formatBoth(t, 'UTC')).toBe('2026-07-15 10:05:07 UTC');
	});
});

describe('formatDuration', () => {
	it('uses the largest sensible units', () => {
		expect(formatDuration(45)).toBe('45 s');
		expect(formatDuration(750)).toBe('12 min 30 s');
		expect(formatDuration(3900)).toBe('1 h 05 min');
		expect(formatDuration(3 * 86_400 + 4 * 3600)).toBe('3 d 4 h');
	});
});

describe('formatShare', () => {
	it('never rounds a shortfall up to 100 %', () => {
		expect(formatShare(1)).toBe('100.00 %');
		expect(formatShare(0.99996)).toBe('99.99 %');
		expect(formatShare(11 / 12)).toBe('91.66 %');
		expect(formatShare(0.85)).toBe('85.00 %');
		expect(formatShare(null)).toBe('—');
	});
});

describe('tickLabels', () => {
	it('writes 24-hour times with the date where it changes, in the zone', () => {
		const h = 3_600_000;
		// 20:00Z, 22:00Z, 00:00Z, 02:00Z on 2026-01-01/02; Oslo is UTC+1 in January
		const ticks = [
			Date.UTC(2026, 0, 1, 20),
			Date.UTC(2026, 0, 1, 22),
			Date.UTC(2026, 0, 2, 0),
			Date.UTC(2026, 0, 2, 2)
		];
		expect(tickLabels(ticks, 'Europe/Oslo', 2 * h)).toEqual([
			'21:00\n2026-01-01',
			'23:00',
			'01:00\n2026-01-02',
			'03:00'
		]);
		expect(tickLabels(ticks.slice(0, 1), 'UTC', 10_000)).toEqual(['20:00:00\n2026-01-01']);
		// a tick a day: month-day, with the year at the first tick and at a new year
		const days = [Date.UTC(2025, 11, 31), Date.UTC(2026, 0, 1), Date.UTC(2026, 0, 2)];
		expect(tickLabels(days, 'UTC', 86_400_000)).toEqual(['2025-12-31', '2026-01-01', '01-02']);
	});
});
