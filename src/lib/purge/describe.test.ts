import { describe, expect, it } from 'vitest';
import cron from 'node-cron';
import { cronExpressionFor, describeSchedule, formatInterval } from './describe';
import { runMinutesOfDay } from './schedule';
import { schedule } from './test-fixtures';

describe('formatInterval', () => {
	it('writes hours and minutes', () => {
		expect(formatInterval(240)).toBe('4 h');
		expect(formatInterval(90)).toBe('1 h 30 min');
		expect(formatInterval(45)).toBe('45 min');
	});
});

describe('describeSchedule', () => {
	it('lists the times of the day and what the quiet hours skip', () => {
		expect(describeSchedule(schedule({ quiet_hours: [{ from: '22:00', to: '06:00' }] }))).toBe(
			'Every 4 h at 00:30, 04:30, 08:30, 12:30, 16:30 and 20:30 (vessel time), purging 20 s; ' +
				'none between 22:00 and 06:00, so 00:30 and 04:30 are skipped.'
		);
	});

	it('says "Paused" when disabled', () => {
		expect(describeSchedule(schedule({ enabled: false }))).toBe('Paused');
	});

	it('says the count restarts each day when the interval does not divide 24 h', () => {
		expect(describeSchedule(schedule({ interval_min: 420, offset_min: 60, duration_s: 30 }))).toBe(
			'Every 7 h at 01:00, 08:00, 15:00 and 22:00 (vessel time), purging 30 s; ' +
				'the count restarts at 01:00 each day, so after 22:00 the next run is 3 h later.'
		);
	});

	it('gives a range instead of a long list, and counts many skipped runs', () => {
		const s = schedule({ interval_min: 15, offset_min: 5, duration_s: 10 });
		expect(describeSchedule(s)).toBe(
			'Every 15 min from 00:05 to 23:50 (vessel time), purging 10 s.'
		);
		// 22:00–06:00 is 8 h of four runs each
		expect(describeSchedule({ ...s, quiet_hours: [{ from: '22:00', to: '06:00' }] })).toBe(
			'Every 15 min from 00:05 to 23:50 (vessel time), purging 10 s; ' +
				'none between 22:00 and 06:00, so 32 runs a day are skipped.'
		);
	});

	it('words a daily run, several windows and a single skip', () => {
		expect(describeSchedule(schedule({ interval_min: 1440, offset_min: 600 }))).toBe(
			'Once a day at 10:00 (vessel time), purging 20 s.'
		);
		const windows = [
			{ from: '12:00', to: '13:00' },
			{ from: '23:00', to: '01:00' }
		];
		expect(describeSchedule(schedule({ quiet_hours: windows }))).toBe(
			'Every 4 h at 00:30, 04:30, 08:30, 12:30, 16:30 and 20:30 (vessel time), purging 20 s; ' +
				'none between 12:00 and 13:00 or between 23:00 and 01:00, so 00:30 and 12:30 are skipped.'
		);
		expect(describeSchedule(schedule({ quiet_hours: [{ from: '16:00', to: '17:00' }] }))).toMatch(
			/none between 16:00 and 17:00, so 16:30 is skipped\.$/
		);
	});
});

describe('cronExpressionFor', () => {
	it('gives node-cron expressions where one fits', () => {
		expect(cronExpressionFor(schedule())).toBe('30 */4 * * *');
		expect(cronExpressionFor(schedule({ interval_min: 15, offset_min: 5 }))).toBe(
			'5,20,35,50 * * * *'
		);
		expect(cronExpressionFor(schedule({ interval_min: 60, offset_min: 0 }))).toBe('0 * * * *');
		expect(cronExpressionFor(schedule({ interval_min: 240, offset_min: 90 }))).toBe(
			'30 1,5,9,13,17,21 * * *'
		);
		expect(cronExpressionFor(schedule({ interval_min: 1440, offset_min: 600 }))).toBe('0 10 * * *');
	});

	it('is null when no single expression fits, or when paused', () => {
		expect(cronExpressionFor(schedule({ interval_min: 420, offset_min: 0 }))).toBeNull();
		expect(cronExpressionFor(schedule({ interval_min: 90, offset_min: 0 }))).toBeNull();
		expect(cronExpressionFor(schedule({ interval_min: 45, offset_min: 0 }))).toBeNull();
		expect(cronExpressionFor(schedule({ enabled: false }))).toBeNull();
	});

	it('fires, as node-cron reads it, at exactly the run minutes', () => {
		const cases: Array<[number, number]> = [
			[15, 0],
			[20, 7],
			[30, 29],
			[60, 45],
			[120, 0],
			[180, 100],
			[240, 30],
			[360, 359],
			[480, 61],
			[720, 0],
			[1440, 1439]
		];
		for (const [interval_min, offset_min] of cases) {
			const s = schedule({ interval_min, offset_min });
			const expr = cronExpressionFor(s);
			expect(expr, `${interval_min}/${offset_min}`).not.toBeNull();
			const fields = cron.parse(expr as string);
			const minutes = fields.hour.flatMap((h) => fields.minute.map((m) => h * 60 + m));
			expect(
				minutes.sort((a, b) => a - b),
				expr as string
			).toEqual(runMinutesOfDay(s));
		}
	});
});
