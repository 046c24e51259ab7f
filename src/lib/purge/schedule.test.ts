import { describe, expect, it } from 'vitest';
import { isDue, isQuiet, nextRuns, previewRuns, runMinutesOfDay } from './schedule';
import { iso, ms, OSLO, schedule, SINGAPORE } from './test-fixtures';

// The clock-change cases are in schedule-dst.test.ts.

describe('run minutes of an ordinary day', () => {
	it('starts at midnight + offset and steps by the interval within the day', () => {
		expect(runMinutesOfDay({ interval_min: 240, offset_min: 30 })).toEqual([
			30, 270, 510, 750, 990, 1230
		]);
		// 7 h does not divide 24 h: 01:00, 08:00, 15:00, 22:00, and the next day restarts at 01:00
		expect(runMinutesOfDay({ interval_min: 420, offset_min: 60 })).toEqual([60, 480, 900, 1320]);
	});

	it('refuses an interval that would never advance', () => {
		expect(() => runMinutesOfDay({ interval_min: 0, offset_min: 0 })).toThrow(RangeError);
	});
});

describe('nextRuns', () => {
	it('lists the next 10 runs in UTC, every 4 h from 00:30', () => {
		const runs = nextRuns(schedule(), 'UTC', ms('2026-01-10T05:00:00Z'));
		expect(iso(runs)).toEqual([
			'2026-01-10T08:30:00.000Z',
			'2026-01-10T12:30:00.000Z',
			'2026-01-10T16:30:00.000Z',
			'2026-01-10T20:30:00.000Z',
			'2026-01-11T00:30:00.000Z',
			'2026-01-11T04:30:00.000Z',
			'2026-01-11T08:30:00.000Z',
			'2026-01-11T12:30:00.000Z',
			'2026-01-11T16:30:00.000Z',
			'2026-01-11T20:30:00.000Z'
		]);
	});

	it('is strictly after `from` and takes a Date as well as epoch ms', () => {
		expect(iso(nextRuns(schedule(), 'UTC', new Date('2026-01-10T08:30:00Z'), 1))).toEqual([
			'2026-01-10T12:30:00.000Z'
		]);
		expect(iso(nextRuns(schedule(), 'UTC', ms('2026-01-10T08:30:00Z') - 1, 1))).toEqual([
			'2026-01-10T08:30:00.000Z'
		]);
	});

	it('is empty when paused or when no runs are asked for', () => {
		expect(nextRuns(schedule({ enabled: false }), 'UTC', 0)).toEqual([]);
		expect(nextRuns(schedule(), 'UTC', 0, 0)).toEqual([]);
	});

	it('restarts each day at midnight + offset when the interval does not divide 24 h', () => {
		const runs = nextRuns(
			schedule({ interval_min: 420, offset_min: 60 }),
			'UTC',
			ms('2026-01-10T00:00:00Z'),
			5
		);
		expect(iso(runs)).toEqual([
			'2026-01-10T01:00:00.000Z',
			'2026-01-10T08:00:00.000Z',
			'2026-01-10T15:00:00.000Z',
			'2026-01-10T22:00:00.000Z',
			'2026-01-11T01:00:00.000Z' // 3 h after 22:00, not 7 h
		]);
	});

	it('runs at vessel wall-clock times: Singapore (+08:00, no DST)', () => {
		// 12:00, 18:00 SGT on the 29th, 00:00 and 06:00 SGT on the 30th
		const runs = nextRuns(
			schedule({ interval_min: 360, offset_min: 0 }),
			SINGAPORE,
			ms('2026-03-29T00:00:00Z'),
			4
		);
		expect(iso(runs)).toEqual([
			'2026-03-29T04:00:00.000Z',
			'2026-03-29T10:00:00.000Z',
			'2026-03-29T16:00:00.000Z',
			'2026-03-29T22:00:00.000Z'
		]);
	});

	it('throws on an unknown time zone', () => {
		expect(() => nextRuns(schedule(), 'Mars/Olympus', 0)).toThrow(RangeError);
	});
});

describe('quiet hours', () => {
	const night = [{ from: '22:00', to: '06:00' }];

	it('skip runs in a window that wraps past midnight; from is inside, to is outside', () => {
		const s = schedule({ interval_min: 120, offset_min: 0, quiet_hours: night });
		const runs = nextRuns(s, 'UTC', ms('2026-01-10T00:00:00Z'), 9);
		expect(iso(runs)).toEqual([
			'2026-01-10T06:00:00.000Z',
			'2026-01-10T08:00:00.000Z',
			'2026-01-10T10:00:00.000Z',
			'2026-01-10T12:00:00.000Z',
			'2026-01-10T14:00:00.000Z',
			'2026-01-10T16:00:00.000Z',
			'2026-01-10T18:00:00.000Z',
			'2026-01-10T20:00:00.000Z', // 22:00, 00:00, 02:00, 04:00 skipped, not postponed
			'2026-01-11T06:00:00.000Z'
		]);
	});

	it('are in vessel time (Singapore)', () => {
		const s = schedule({ interval_min: 240, offset_min: 0, quiet_hours: night });
		const runs = nextRuns(s, SINGAPORE, ms('2026-04-30T23:00:00Z'), 5);
		// 08:00, 12:00, 16:00, 20:00 SGT; 00:00 and 04:00 SGT are quiet
		expect(iso(runs)).toEqual([
			'2026-05-01T00:00:00.000Z',
			'2026-05-01T04:00:00.000Z',
			'2026-05-01T08:00:00.000Z',
			'2026-05-01T12:00:00.000Z',
			'2026-05-02T00:00:00.000Z'
		]);
	});

	it('skip a run whose discharge would reach into the window', () => {
		const lunch = [{ from: '12:00', to: '13:00' }];
		const from = ms('2026-01-10T10:00:00Z');
		// 11:59 + 90 s discharges until 12:00:30; 12:59 starts inside
		const long = schedule({ interval_min: 60, offset_min: 59, duration_s: 90, quiet_hours: lunch });
		expect(iso(nextRuns(long, 'UTC', from, 2))).toEqual([
			'2026-01-10T10:59:00.000Z',
			'2026-01-10T13:59:00.000Z'
		]);
		// 11:59 + 60 s ends as the window opens: it runs
		const short = { ...long, duration_s: 60 };
		expect(iso(nextRuns(short, 'UTC', from, 2))).toEqual([
			'2026-01-10T10:59:00.000Z',
			'2026-01-10T11:59:00.000Z'
		]);
	});

	it('are judged on the wall time the valve actually opens, after a clock change', () => {
		// 02:30 is moved to 03:00 CEST, which is outside 02:00–03:00, so it runs
		const s = schedule({
			interval_min: 60,
			offset_min: 30,
			quiet_hours: [{ from: '02:00', to: '03:00' }]
		});
		expect(isDue(s, OSLO, ms('2026-03-29T01:00:00Z'))).toBe(true);
	});

	it('isQuiet tells whether an instant is in a window', () => {
		const s = { quiet_hours: night };
		expect(isQuiet(s, 'UTC', ms('2026-01-10T21:59:59Z'))).toBe(false);
		expect(isQuiet(s, 'UTC', ms('2026-01-10T22:00:00Z'))).toBe(true);
		expect(isQuiet(s, 'UTC', ms('2026-01-11T05:59:59Z'))).toBe(true);
		expect(isQuiet(s, 'UTC', ms('2026-01-11T06:00:00Z'))).toBe(false);
		// 05:00Z is 13:00 in Singapore
		expect(isQuiet(s, SINGAPORE, ms('2026-01-11T05:00:00Z'))).toBe(false);
		// both 02:30 on the Oslo fall-back day are in 02:00–03:00
		const early = { quiet_hours: [{ from: '02:00', to: '03:00' }] };
		expect(isQuiet(early, OSLO, ms('2026-10-25T00:30:00Z'))).toBe(true);
		expect(isQuiet(early, OSLO, ms('2026-10-25T01:30:00Z'))).toBe(true);
		expect(isQuiet({ quiet_hours: [] }, 'UTC', 0)).toBe(false);
	});
});

describe('isDue (per-minute tick)', () => {
	it('is true for the whole run minute and no other', () => {
		const s = schedule();
		expect(isDue(s, 'UTC', ms('2026-01-10T04:30:00Z'))).toBe(true);
		expect(isDue(s, 'UTC', new Date(ms('2026-01-10T04:31:00Z') - 1))).toBe(true);
		expect(isDue(s, 'UTC', ms('2026-01-10T04:31:00Z'))).toBe(false);
		expect(isDue(s, 'UTC', ms('2026-01-10T04:29:59Z'))).toBe(false);
	});

	it('is false when paused or quiet', () => {
		const at = ms('2026-01-10T04:30:00Z');
		expect(isDue(schedule({ enabled: false }), 'UTC', at)).toBe(false);
		expect(isDue(schedule({ quiet_hours: [{ from: '04:00', to: '05:00' }] }), 'UTC', at)).toBe(
			false
		);
	});

	it('fires at 03:00 CEST for the 02:30 run moved by spring forward (Oslo)', () => {
		const s = schedule({ interval_min: 60, offset_min: 30 });
		expect(isDue(s, OSLO, ms('2026-03-29T01:00:00Z'))).toBe(true);
		expect(isDue(s, OSLO, ms('2026-03-29T01:30:00Z'))).toBe(true);
		expect(isDue(s, OSLO, ms('2026-03-29T01:15:00Z'))).toBe(false);
	});
});

describe('previewRuns', () => {
	it('gives each run in vessel time and UTC and flags a run moved by the clock change', () => {
		const s = schedule({ interval_min: 240, offset_min: 150 });
		expect(previewRuns(s, OSLO, ms('2026-03-28T23:00:00Z'), 2)).toEqual([
			{
				at: ms('2026-03-29T01:00:00Z'),
				vessel: '2026-03-29 03:00 +02:00',
				utc: '2026-03-29 01:00 UTC',
				moved_by_clock_change: true
			},
			{
				at: ms('2026-03-29T04:30:00Z'),
				vessel: '2026-03-29 06:30 +02:00',
				utc: '2026-03-29 04:30 UTC',
				moved_by_clock_change: false
			}
		]);
	});
});
