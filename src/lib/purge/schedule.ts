/**
 * When a separator purges: the schedule arithmetic, pure and shared by server and browser.
 *
 * Semantics (the technician sets wall-clock times, because quiet hours, watches and port rules
 * are in the vessel's local time):
 *
 * - Runs are at local wall-clock times in the vessel's IANA time zone: midnight + offset_min +
 *   k × interval_min for k = 0, 1, … while that stays within the local day. Every 4 h with
 *   offset 30 is 00:30, 04:30, … 20:30. When the interval does not divide 24 h the count
 *   restarts at midnight + offset each day (every 7 h: 00:00, 07:00, 14:00, 21:00, then 00:00),
 *   so the last gap of the day is shorter; the words shown say so.
 * - Spring forward: a wall time inside the gap (02:30 on 2026-03-29 in Europe/Oslo) runs at the
 *   first minute the clock shows after the gap (03:00). Moving it, rather than skipping it,
 *   keeps the real time between two purges no longer than the interval (skipping can stretch
 *   it to almost twice the interval while sediment keeps collecting). Several runs inside one
 *   gap collapse into that one minute.
 * - Fall back: a wall time that occurs twice runs once, at its first occurrence. The repeated
 *   hour is not purged twice, so that day one gap is up to an hour longer than the interval.
 * - Quiet hours are local wall-clock windows [from, to), wrapping past midnight when `to` is
 *   earlier than `from`. A run is skipped, not postponed, when any part of its discharge
 *   (start to start + duration) falls in a quiet window: the preview is then exactly what
 *   will happen, a postponed run would bunch up with the next regular one at the end of the
 *   window, and ΔP and "purge now" cover a long window. Quiet is judged on the wall time at
 *   which the valve would actually open (after any clock-change move).
 */
import { DateTime } from 'luxon';
import type { PurgeSchedule, QuietWindow } from './input';

/** 24-hour HH:MM, 00:00 to 23:59 (24:00 is written 00:00) */
export const HH_MM = /^([01]\d|2[0-3]):[0-5]\d$/;
export const MIN_PER_DAY = 24 * 60;
const MS_PER_MIN = 60_000;

/** "22:30" → 1350 (minutes after midnight) */
export function parseHhMm(text: string): number {
	if (!HH_MM.test(text)) throw new RangeError(`not a HH:MM time: ${text}`);
	return Number(text.slice(0, 2)) * 60 + Number(text.slice(3, 5));
}

/** 1350 → "22:30" */
export function formatHhMm(minuteOfDay: number): string {
	const h = Math.floor(minuteOfDay / 60);
	const m = minuteOfDay % 60;
	return `${String(h).padStart(2, '0')}:${String(m).padStart(2, '0')}`;
}

/** The wall-clock minutes of an ordinary day (no clock change) at which the schedule runs. */
export function runMinutesOfDay(s: Pick<PurgeSchedule, 'interval_min' | 'offset_min'>): number[] {
	// Guards the loop below against a schedule that never went through the schema.
	if (!Number.isInteger(s.interval_min) || s.interval_min < 1) {
		throw new RangeError(`interval_min must be a positive whole number, got ${s.interval_min}`);
	}
	const minutes: number[] = [];
	for (let m = s.offset_min; m < MIN_PER_DAY; m += s.interval_min) minutes.push(m);
	return minutes;
}

/** Whether a wall-clock minute of the day lies in one of the windows. */
export function inQuietWindow(windows: readonly QuietWindow[], minuteOfDay: number): boolean {
	return windows.some((w) => {
		const from = parseHhMm(w.from);
		const to = parseHhMm(w.to);
		return from < to
			? minuteOfDay >= from && minuteOfDay < to
			: minuteOfDay >= from || minuteOfDay < to;
	});
}

/**
 * Whether a purge starting at a wall minute would discharge in a quiet window on an ordinary day.
 * The windows start on whole minutes, so checking each minute the valve is open is exact.
 */
export function dischargesInQuiet(
	windows: readonly QuietWindow[],
	startMinute: number,
	durationS: number
): boolean {
	for (let k = 0; k * 60 < durationS; k++) {
		if (inQuietWindow(windows, (startMinute + k) % MIN_PER_DAY)) return true;
	}
	return false;
}

function toMs(at: Date | number): number {
	return typeof at === 'number' ? at : at.getTime();
}

function zoned(ms: number, timeZone: string): DateTime {
	const dt = DateTime.fromMillis(ms, { zone: timeZone });
	if (!dt.isValid) throw new RangeError(`unknown time zone: ${timeZone}`);
	return dt;
}

/** Whether the instant `at` is inside one of the schedule's quiet windows, in vessel time. */
export function isQuiet(
	s: Pick<PurgeSchedule, 'quiet_hours'>,
	timeZone: string,
	at: Date | number
): boolean {
	const local = zoned(toMs(at), timeZone);
	return inQuietWindow(s.quiet_hours, local.hour * 60 + local.minute);
}

function quietDuring(s: PurgeSchedule, timeZone: string, startMs: number): boolean {
	for (let k = 0; k * 60 < s.duration_s; k++) {
		if (isQuiet(s, timeZone, startMs + k * MS_PER_MIN)) return true;
	}
	return false;
}

interface LocalDate {
	year: number;
	month: number;
	day: number;
}

/** The instant a run at this wall minute of this local date happens (see the rules above). */
function resolveWallTime(date: LocalDate, minuteOfDay: number, timeZone: string): number {
	const hour = Math.floor(minuteOfDay / 60);
	const minute = minuteOfDay % 60;
	const wanted = DateTime.fromObject({ ...date, hour, minute }, { zone: timeZone });
	if (wanted.hour === hour && wanted.minute === minute) {
		// Luxon resolves an ambiguous wall time to its later occurrence; we run at the first.
		return Math.min(...wanted.getPossibleOffsets().map((d) => d.toMillis()));
	}
	// In a spring-forward gap luxon moves the time on by the gap's length. We want the first
	// instant whose wall time is at or after the wanted one: the instant of the change.
	const wall = Date.UTC(date.year, date.month - 1, date.day, hour, minute);
	const wallOf = (ms: number) => ms + zoned(ms, timeZone).offset * MS_PER_MIN;
	let lo = wall - wanted.offset * MS_PER_MIN; // before the change: its wall time is too early
	let hi = wanted.toMillis(); // after the change
	while (hi - lo > MS_PER_MIN) {
		const mid = lo + Math.floor((hi - lo) / 2 / MS_PER_MIN) * MS_PER_MIN;
		if (wallOf(mid) >= wall) hi = mid;
		else lo = mid;
	}
	return hi;
}

/** The runs of one local date, in order, without duplicates and without quiet ones. */
function runsOnLocalDate(s: PurgeSchedule, timeZone: string, date: LocalDate): number[] {
	const instants = new Set(runMinutesOfDay(s).map((m) => resolveWallTime(date, m, timeZone)));
	return [...instants].sort((a, b) => a - b).filter((t) => !quietDuring(s, timeZone, t));
}

function localDate(ms: number, timeZone: string): LocalDate {
	const { year, month, day } = zoned(ms, timeZone);
	return { year, month, day };
}

/**
 * The next `count` runs strictly after `from`, in order. Empty when the schedule is paused;
 * shorter than `count` only when quiet hours leave no run in the day (the schema refuses that).
 */
export function nextRuns(
	s: PurgeSchedule,
	timeZone: string,
	from: Date | number,
	count = 10
): Date[] {
	if (!s.enabled || count <= 0) return [];
	const fromMs = toMs(from);
	const start = localDate(fromMs, timeZone);
	// Calendar days are counted in UTC so stepping a day never meets a clock change.
	const first = DateTime.utc(start.year, start.month, start.day);
	const runs: number[] = [];
	// Every ordinary day has a run, so count + a few days always suffice.
	for (let i = 0; runs.length < count && i < count + 7; i++) {
		const { year, month, day } = first.plus({ days: i });
		for (const t of runsOnLocalDate(s, timeZone, { year, month, day })) {
			if (t > fromMs && runs.length < count && !runs.includes(t)) runs.push(t);
		}
	}
	return runs.map((t) => new Date(t));
}

/**
 * For a once-a-minute tick: whether a purge is due in the minute that contains `at`. True
 * exactly for the minutes `nextRuns` lists, so a late tick within the minute still fires.
 */
export function isDue(s: PurgeSchedule, timeZone: string, at: Date | number): boolean {
	if (!s.enabled) return false;
	const minute = Math.floor(toMs(at) / MS_PER_MIN) * MS_PER_MIN;
	const local = zoned(minute, timeZone);
	// A run lands only on a run minute of the wall clock, or on the minute a spring-forward gap
	// ends; ruling the rest out cheaply keeps a tick from resolving the whole day every minute.
	const wall = local.hour * 60 + local.minute;
	const onRunMinute = wall >= s.offset_min && (wall - s.offset_min) % s.interval_min === 0;
	const afterGap = zoned(minute - MS_PER_MIN, timeZone).offset < local.offset;
	if (!onRunMinute && !afterGap) return false;
	return runsOnLocalDate(s, timeZone, localDate(minute, timeZone)).includes(minute);
}

export interface PreviewRun {
	at: number;
	/** vessel time with its UTC offset, e.g. "2026-03-29 03:00 +02:00" */
	vessel: string;
	/** e.g. "2026-03-29 01:00 UTC" */
	utc: string;
	/** the wall time was moved by a spring-forward clock change */
	moved_by_clock_change: boolean;
}

/** The next runs for the schedule page: each in vessel time and UTC. */
export function previewRuns(
	s: PurgeSchedule,
	timeZone: string,
	from: Date | number,
	count = 10
): PreviewRun[] {
	const wallMinutes = new Set(runMinutesOfDay(s));
	return nextRuns(s, timeZone, from, count).map((d) => {
		const local = zoned(d.getTime(), timeZone);
		return {
			at: d.getTime(),
			vessel: local.toFormat('yyyy-LL-dd HH:mm ZZ'),
			utc: local.toUTC().toFormat("yyyy-LL-dd HH:mm 'UTC'"),
			moved_by_clock_change: !wallMinutes.has(local.hour * 60 + local.minute)
		};
	});
}
