import { describe, expect, it } from 'vitest';
import {
	MAX_DURATION_S,
	MIN_INTERVAL_MIN,
	purgeScheduleInput,
	type PurgeScheduleInput
} from './input';

const body = (over: Record<string, unknown> = {}): PurgeScheduleInput =>
	({
		enabled: true,
		interval_min: 240,
		duration_s: 20,
		offset_min: 30,
		quiet_hours: [{ from: '22:00', to: '06:00' }],
		reason: 'more silt in the river',
		...over
	}) as PurgeScheduleInput;

/** The field → message map the API's 422 carries (first message per field). */
function fields(input: unknown): Record<string, string> {
	const result = purgeScheduleInput.safeParse(input);
	if (result.success) return {};
	const out: Record<string, string> = {};
	for (const issue of result.error.issues) out[issue.path.join('.') || '_'] ??= issue.message;
	return out;
}

describe('purgeScheduleInput', () => {
	it('accepts a full body and fills in the defaults', () => {
		expect(purgeScheduleInput.parse(body())).toEqual(body());
		const minimal = { enabled: false, interval_min: 60, duration_s: 10, reason: 'in port' };
		expect(purgeScheduleInput.parse(minimal)).toEqual({
			...minimal,
			offset_min: 0,
			quiet_hours: []
		});
	});

	it('trims the reason and refuses a blank one (every change is audited)', () => {
		expect(purgeScheduleInput.parse(body({ reason: '  silt  ' })).reason).toBe('silt');
		expect(fields(body({ reason: '   ' }))).toEqual({
			reason: 'say why the schedule changes (it is kept in the audit log)'
		});
		const { reason: _, ...noReason } = body();
		expect(fields(noReason)).toEqual({ reason: 'required' });
	});

	it('bounds the interval: 15 min to 24 h, whole minutes', () => {
		expect(fields(body({ interval_min: 10, offset_min: 0 }))).toEqual({
			interval_min: 'at least 15 min'
		});
		expect(fields(body({ interval_min: 1441 }))).toEqual({
			interval_min: 'at most 1440 min (24 h)'
		});
		expect(fields(body({ interval_min: 90.5 }))).toEqual({
			interval_min: 'a whole number of minutes'
		});
		expect(fields(body({ interval_min: '240' }))).toEqual({
			interval_min: 'a whole number of minutes, 15 to 1440'
		});
		expect(fields(body({ interval_min: 15, offset_min: 0 }))).toEqual({});
		expect(fields(body({ interval_min: 1440, quiet_hours: [] }))).toEqual({});
	});

	it('bounds the duration: 5 to 600 s', () => {
		expect(fields(body({ duration_s: 4 }))).toEqual({ duration_s: 'at least 5 s' });
		expect(fields(body({ duration_s: 601 }))).toEqual({ duration_s: 'at most 600 s' });
		expect(fields(body({ duration_s: 5 }))).toEqual({});
		expect(fields(body({ duration_s: 600 }))).toEqual({});
	});

	it('keeps the duration shorter than the interval', () => {
		// the bounds alone guarantee it; this fails if someone widens them without adding a check
		expect(MAX_DURATION_S).toBeLessThan(MIN_INTERVAL_MIN * 60);
		// a 15 min purge every 15 min is refused, on the duration
		expect(fields(body({ interval_min: 15, offset_min: 0, duration_s: 900 }))).toEqual({
			duration_s: 'at most 600 s'
		});
	});

	it('keeps the offset below the interval, reported on the offset', () => {
		expect(fields(body({ interval_min: 60, offset_min: 60 }))).toEqual({
			offset_min: 'must be less than the interval (60 min)'
		});
		expect(fields(body({ offset_min: -5 }))).toEqual({
			offset_min: 'at least 0 min (0 = the first purge at midnight)'
		});
		expect(fields(body({ interval_min: 60, offset_min: 59 }))).toEqual({});
	});

	it('checks quiet-hour times as 24-hour HH:MM', () => {
		expect(fields(body({ quiet_hours: [{ from: '25:00', to: '06:00' }] }))).toEqual({
			'quiet_hours.0.from': 'a time as HH:MM (24-hour, 00:00 to 23:59), e.g. 22:00'
		});
		for (const bad of ['24:00', '7:00', '07:60', '0700', '']) {
			expect(Object.keys(fields(body({ quiet_hours: [{ from: '12:00', to: bad }] })))).toEqual([
				'quiet_hours.0.to'
			]);
		}
		expect(fields(body({ quiet_hours: [{ from: '12:00' }] }))).toEqual({
			'quiet_hours.0.to': 'required'
		});
		const edges = [
			{ from: '00:00', to: '00:10' },
			{ from: '23:50', to: '23:59' }
		];
		expect(fields(body({ quiet_hours: edges }))).toEqual({});
	});

	it('refuses a window that starts and ends at the same time', () => {
		expect(fields(body({ quiet_hours: [{ from: '22:00', to: '22:00' }] }))).toEqual({
			'quiet_hours.0.to':
				'must differ from the start time (use an earlier time to run past midnight)'
		});
	});

	it('takes at most 6 windows', () => {
		const seven = Array.from({ length: 7 }, (_, i) => ({ from: `0${i}:00`, to: `0${i}:10` }));
		expect(fields(body({ quiet_hours: seven }))).toEqual({
			quiet_hours: 'at most 6 quiet windows'
		});
		expect(fields(body({ quiet_hours: seven.slice(0, 6) }))).toEqual({});
	});

	it('refuses quiet hours that leave no purge in the day', () => {
		// once a day at 10:00, quiet 08:00–12:00: the schedule would never purge
		expect(
			fields(
				body({ interval_min: 1440, offset_min: 600, quiet_hours: [{ from: '08:00', to: '12:00' }] })
			)
		).toEqual({
			quiet_hours:
				'these quiet hours leave no purge in the day (runs at 10:00); shorten them, or pause the schedule instead'
		});
		// 09:59 + 90 s reaches 10:00: still no purge
		expect(
			Object.keys(
				fields(
					body({
						interval_min: 1440,
						offset_min: 599,
						duration_s: 90,
						quiet_hours: [{ from: '10:00', to: '12:00' }]
					})
				)
			)
		).toEqual(['quiet_hours']);
		// every 15 min, quiet all day but one minute: the runs are counted, not listed
		expect(
			fields(
				body({ interval_min: 15, offset_min: 0, quiet_hours: [{ from: '00:00', to: '23:59' }] })
			)
		).toEqual({
			quiet_hours:
				'these quiet hours leave no purge in the day (all 96 runs); shorten them, or pause the schedule instead'
		});
		expect(
			fields(
				body({ interval_min: 1440, offset_min: 600, quiet_hours: [{ from: '10:01', to: '12:00' }] })
			)
		).toEqual({});
	});

	it('names every field at fault at once', () => {
		expect(
			Object.keys(fields({ enabled: 'yes', interval_min: 5, duration_s: 0, reason: '' })).sort()
		).toEqual(['duration_s', 'enabled', 'interval_min', 'reason']);
	});
});
