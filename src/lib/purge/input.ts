/**
 * The purge schedule as a technician sets it: the PUT body of
 * `/api/vessels/{id}/purge-schedule`, validated field by field so a 422 names the field at fault
 * with a message a technician can act on.
 */
import { z } from 'zod';
import { dischargesInQuiet, formatHhMm, HH_MM, runMinutesOfDay } from './schedule';

// Bounds are product choices from the purge-schedule issue, not published figures.
/** min: shorter cycles wear the valve and waste water for little collected sediment */
export const MIN_INTERVAL_MIN = 15;
/** min: at least one purge a day */
export const MAX_INTERVAL_MIN = 24 * 60;
/** s: shorter than a valve stroke plus a flush */
export const MIN_DURATION_S = 5;
/** s: 10 min of discharge is already a long purge */
export const MAX_DURATION_S = 600;
export const MAX_QUIET_WINDOWS = 6;

// The duration must be shorter than the interval. With these bounds it always is
// (600 s < 15 min), so no cross-field check is needed; input.test.ts pins the invariant.

const required = (what: string) => (issue: { input?: unknown }) =>
	issue.input === undefined ? 'required' : what;

const wholeNumber = (what: string, min: number, max: number, unit: string, maxNote = '') =>
	z
		.number({ error: required(`a whole number of ${what}, ${min} to ${max}`) })
		.int(`a whole number of ${what}`)
		.min(min, `at least ${min} ${unit}`)
		.max(max, `at most ${max} ${unit}${maxNote}`);

const wallTime = z
	.string({ error: required('a time as HH:MM (24-hour), e.g. 22:00') })
	.trim()
	.regex(HH_MM, 'a time as HH:MM (24-hour, 00:00 to 23:59), e.g. 22:00');

/** A local wall-clock window [from, to); `to` earlier than `from` wraps past midnight. */
export const quietWindow = z
	.object({ from: wallTime, to: wallTime })
	.refine((w) => w.from !== w.to, {
		path: ['to'],
		message: 'must differ from the start time (use an earlier time to run past midnight)'
	});

export const purgeScheduleInput = z
	.object({
		enabled: z.boolean({ error: required('true to run the schedule, false to pause it') }),
		interval_min: wholeNumber('minutes', MIN_INTERVAL_MIN, MAX_INTERVAL_MIN, 'min', ' (24 h)'),
		duration_s: wholeNumber('seconds', MIN_DURATION_S, MAX_DURATION_S, 's'),
		offset_min: z
			.number({ error: 'a whole number of minutes after midnight' })
			.int('a whole number of minutes after midnight')
			.min(0, 'at least 0 min (0 = the first purge at midnight)')
			.default(0),
		quiet_hours: z
			.array(quietWindow, { error: 'a list of {from, to} windows' })
			.max(MAX_QUIET_WINDOWS, `at most ${MAX_QUIET_WINDOWS} quiet windows`)
			.default([]),
		reason: z
			.string({ error: required('a short text saying why the schedule changes') })
			.trim()
			.min(1, 'say why the schedule changes (it is kept in the audit log)')
			.max(500, 'at most 500 characters')
	})
	.superRefine((s, ctx) => {
		// zod runs this even when a field failed above, so each check first makes sure the
		// fields it reads are themselves valid, and reports on the field the technician should change.
		const intervalOk =
			Number.isInteger(s.interval_min) &&
			s.interval_min >= MIN_INTERVAL_MIN &&
			s.interval_min <= MAX_INTERVAL_MIN;
		if (!intervalOk || !Number.isInteger(s.offset_min) || s.offset_min < 0) return;
		if (s.offset_min >= s.interval_min) {
			ctx.addIssue({
				code: 'custom',
				path: ['offset_min'],
				message: `must be less than the interval (${s.interval_min} min)`
			});
			return;
		}
		const durationOk =
			Number.isInteger(s.duration_s) &&
			s.duration_s >= MIN_DURATION_S &&
			s.duration_s <= MAX_DURATION_S;
		const windows = Array.isArray(s.quiet_hours) ? s.quiet_hours : [];
		const windowsOk = windows.every(
			(w) => HH_MM.test(w?.from) && HH_MM.test(w?.to) && w.from !== w.to
		);
		if (!durationOk || !windowsOk || windows.length === 0) return;
		// A schedule whose every run is quiet never purges while showing as enabled: pausing says
		// that honestly. Judged on an ordinary day; a clock change can move one run, not all.
		const runs = runMinutesOfDay(s);
		const kept = runs.filter((m) => !dischargesInQuiet(windows, m, s.duration_s));
		if (kept.length === 0) {
			const which =
				runs.length > 6 ? `all ${runs.length} runs` : `runs at ${runs.map(formatHhMm).join(', ')}`;
			ctx.addIssue({
				code: 'custom',
				path: ['quiet_hours'],
				message:
					`these quiet hours leave no purge in the day (${which}); ` +
					'shorten them, or pause the schedule instead'
			});
		}
	});

/** The PUT body as sent (offset_min and quiet_hours may be left out). */
export type PurgeScheduleInput = z.input<typeof purgeScheduleInput>;
/** The PUT body after validation, defaults filled in. */
export type PurgeScheduleChange = z.output<typeof purgeScheduleInput>;
/** A separator's schedule as stored and as the schedule functions take it. */
export type PurgeSchedule = Omit<PurgeScheduleChange, 'reason'>;
export type QuietWindow = z.output<typeof quietWindow>;
