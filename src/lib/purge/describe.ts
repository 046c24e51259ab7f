/** The schedule in words for the technician, and as a cron expression where one fits. */
import type { PurgeSchedule } from './input';
import { dischargesInQuiet, formatHhMm, MIN_PER_DAY, runMinutesOfDay } from './schedule';

/** Beyond this many runs a day the times are given as a range instead of listed. */
const MAX_LISTED_RUNS = 12;
/** Beyond this many skipped runs they are counted instead of listed. */
const MAX_LISTED_SKIPS = 6;

/** 240 → "4 h", 90 → "1 h 30 min", 45 → "45 min" */
export function formatInterval(minutes: number): string {
	const h = Math.floor(minutes / 60);
	const m = minutes % 60;
	if (h === 0) return `${m} min`;
	return m === 0 ? `${h} h` : `${h} h ${m} min`;
}

function listJoin(items: string[]): string {
	if (items.length <= 1) return items.join('');
	return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/**
 * E.g. "Every 4 h at 00:30, 04:30, 08:30, 12:30, 16:30 and 20:30 (vessel time), purging 20 s;
 * none between 22:00 and 06:00, so 00:30 and 04:30 are skipped." — or "Paused".
 */
export function describeSchedule(s: PurgeSchedule): string {
	if (!s.enabled) return 'Paused';
	const runs = runMinutesOfDay(s);
	const first = runs[0];
	const last = runs[runs.length - 1];
	let text: string;
	if (runs.length === 1) {
		text = `Once a day at ${formatHhMm(first)} (vessel time)`;
	} else {
		const times =
			runs.length <= MAX_LISTED_RUNS
				? `at ${listJoin(runs.map(formatHhMm))}`
				: `from ${formatHhMm(first)} to ${formatHhMm(last)}`;
		text = `Every ${formatInterval(s.interval_min)} ${times} (vessel time)`;
	}
	text += `, purging ${s.duration_s} s`;

	if (runs.length > 1 && MIN_PER_DAY % s.interval_min !== 0) {
		const wrapGap = MIN_PER_DAY - last + first;
		text +=
			`; the count restarts at ${formatHhMm(first)} each day, ` +
			`so after ${formatHhMm(last)} the next run is ${formatInterval(wrapGap)} later`;
	}

	if (s.quiet_hours.length > 0) {
		const windows = s.quiet_hours.map((w) => `${w.from} and ${w.to}`);
		text += `; none between ${windows.join(' or between ')}`;
		const skipped = runs.filter((m) => dischargesInQuiet(s.quiet_hours, m, s.duration_s));
		if (skipped.length > MAX_LISTED_SKIPS) {
			text += `, so ${skipped.length} runs a day are skipped`;
		} else if (skipped.length > 0) {
			const verb = skipped.length === 1 ? 'is' : 'are';
			text += `, so ${listJoin(skipped.map(formatHhMm))} ${verb} skipped`;
		}
	}
	return `${text}.`;
}

/**
 * A node-cron expression (to run with the vessel's time zone) that fires at the schedule's run
 * minutes, when one expression can: the interval divides an hour, or is whole hours dividing a
 * day. Otherwise, or when paused, null. It knows nothing of quiet hours or clock changes, so a
 * job started from it must still ask `isDue`, and it would miss a run moved by spring-forward:
 * ticking every minute and asking `isDue` is the exact way; this is for showing and checking.
 */
export function cronExpressionFor(s: PurgeSchedule): string | null {
	if (!s.enabled) return null;
	const runs = runMinutesOfDay(s);
	const interval = s.interval_min;
	if (60 % interval === 0) {
		return `${runs.filter((m) => m < 60).join(',')} * * * *`;
	}
	if (interval % 60 !== 0 || MIN_PER_DAY % interval !== 0) return null;
	const minute = s.offset_min % 60;
	const hours = runs.map((m) => Math.floor(m / 60));
	const hourField = hours.length > 1 && hours[0] === 0 ? `*/${interval / 60}` : hours.join(',');
	return `${minute} ${hourField} * * *`;
}
