/**
 * Times in logger files. A time with an offset (Z, +02:00) is used as given;
 * a naive one ("2026-03-29 02:30:00") is wall-clock time in the zone the
 * uploader names, with the zone's daylight-saving rules from the IANA
 * database (through luxon and the platform's Intl). A wall-clock time that
 * does not exist in the zone (skipped when clocks go forward) is refused; one
 * that happens twice (clocks go back) is taken as the first and counted, so
 * the report can say so.
 */
import { IANAZone } from 'luxon';

export const TIME_FORMATS = ['iso', 'dmy', 'mdy', 'epoch_s', 'epoch_ms'] as const;
export type TimeFormat = (typeof TIME_FORMATS)[number];

export const TIME_FORMAT_LABELS: Record<TimeFormat, string> = {
	iso: 'Year first: 2026-03-29 14:05:00 (ISO 8601)',
	dmy: 'Day first: 29/03/2026 14:05:00 or 29.03.2026',
	mdy: 'Month first: 03/29/2026 2:05:00 PM',
	epoch_s: 'Seconds since 1970 (Unix time)',
	epoch_ms: 'Milliseconds since 1970'
};

const MINUTE_MS = 60_000;
const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

const TIME_PART = String.raw`(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*([AaPp][Mm])?`;
const OFFSET_PART = String.raw`\s*(Z|z|UTC|GMT|[+-]\d{2}(?::?\d{2})?)?`;
const PATTERNS: Record<'iso' | 'dmy' | 'mdy', RegExp> = {
	iso: new RegExp(
		String.raw`^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})(?:[T ]+)` + TIME_PART + OFFSET_PART + '$'
	),
	dmy: new RegExp(
		String.raw`^(\d{1,2})[-/.](\d{1,2})[-/.](\d{4})(?:[T ]+)` + TIME_PART + OFFSET_PART + '$'
	),
	mdy: new RegExp(
		String.raw`^(\d{1,2})[-/.](\d{1,2})[-/.](\d{4})(?:[T ]+)` + TIME_PART + OFFSET_PART + '$'
	)
};

export type TimeResult =
	| { ok: true; ts: number; ambiguous: boolean; offsetGiven: boolean }
	| { ok: false; message: string };

const fail = (message: string): TimeResult => ({ ok: false, message });

const daysIn = (year: number, month: number) => new Date(Date.UTC(year, month, 0)).getUTCDate();

function offsetMinutes(text: string): number {
	if (/^(z|utc|gmt)$/i.test(text)) return 0;
	const m = /^([+-])(\d{2}):?(\d{2})?$/.exec(text)!;
	return (m[1] === '-' ? -1 : 1) * (Number(m[2]) * 60 + Number(m[3] ?? 0));
}

type Local = { ok: true; ts: number; ambiguous: boolean } | { ok: false };

/**
 * The instant(s) a wall-clock time (`local`, the wall-clock fields read as if
 * UTC) names in `zone`: each offset the zone uses within a day either side is
 * a candidate, kept when the zone really has that offset at that instant.
 */
export function localToInstant(local: number, zone: IANAZone): Local {
	const offsets = new Set([
		zone.offset(local - DAY_MS),
		zone.offset(local),
		zone.offset(local + DAY_MS)
	]);
	const found: number[] = [];
	for (const o of offsets) {
		const utc = local - o * MINUTE_MS;
		if (zone.offset(utc) === o && !found.includes(utc)) found.push(utc);
	}
	if (found.length === 0) return { ok: false };
	found.sort((a, b) => a - b);
	return { ok: true, ts: found[0], ambiguous: found.length > 1 };
}

/** Parses logger times of one format in one zone; remembers each local hour's offset, as a file has ~3600 rows an hour. */
export class TimeReader {
	readonly zone: IANAZone;
	#hours = new Map<number, number | null>();

	constructor(
		readonly format: TimeFormat,
		zoneName: string
	) {
		this.zone = IANAZone.create(zoneName);
		if (!this.zone.isValid) throw new Error(`unknown time zone “${zoneName}”`);
	}

	#toInstant(local: number): Local {
		const hour = local - (((local % HOUR_MS) + HOUR_MS) % HOUR_MS);
		let cached = this.#hours.get(hour);
		if (cached === undefined) {
			// an hour whose first and last millisecond share one unambiguous offset has it throughout
			const a = localToInstant(hour, this.zone);
			const b = localToInstant(hour + HOUR_MS - 1, this.zone);
			cached =
				a.ok && b.ok && !a.ambiguous && !b.ambiguous && hour - a.ts === hour + HOUR_MS - 1 - b.ts
					? hour - a.ts
					: null;
			this.#hours.set(hour, cached);
		}
		if (cached !== null) return { ok: true, ts: local - cached, ambiguous: false };
		return localToInstant(local, this.zone);
	}

	read(text: string): TimeResult {
		const s = text.trim();
		if (s === '') return fail('no time');
		if (this.format === 'epoch_s' || this.format === 'epoch_ms') {
			if (!/^[+-]?\d+(\.\d+)?$/.test(s))
				return fail(
					`“${s}” is not a number of ${this.format === 'epoch_s' ? 'seconds' : 'milliseconds'}`
				);
			const ts = Math.round(Number(s) * (this.format === 'epoch_s' ? 1000 : 1));
			return Number.isSafeInteger(ts)
				? { ok: true, ts, ambiguous: false, offsetGiven: true }
				: fail(`“${s}” is out of range`);
		}
		const m = PATTERNS[this.format].exec(s);
		if (!m)
			return fail(
				`“${s}” does not read as ${TIME_FORMAT_LABELS[this.format].split(':')[0].toLowerCase()} date and time`
			);
		const [, f1, f2, f3, hh, mi, ss, frac, ampm, off] = m;
		const [year, month, day] =
			this.format === 'iso'
				? [+f1, +f2, +f3]
				: this.format === 'dmy'
					? [+f3, +f2, +f1]
					: [+f3, +f1, +f2];
		let hour = +hh;
		if (ampm) {
			if (hour < 1 || hour > 12) return fail(`“${s}”: hour ${hour} with AM/PM`);
			hour = (hour % 12) + (/p/i.test(ampm) ? 12 : 0);
		}
		const minute = +mi;
		const second = ss === undefined ? 0 : +ss;
		const ms = frac === undefined ? 0 : Math.round(Number(`0.${frac}`) * 1000);
		if (month < 1 || month > 12) return fail(`“${s}”: no month ${month}`);
		if (day < 1 || day > daysIn(year, month)) return fail(`“${s}”: no day ${day} in that month`);
		if (hour > 23 || minute > 59 || second > 59) return fail(`“${s}”: not a time of day`);
		const local = Date.UTC(year, month - 1, day, hour, minute, second) + ms;
		if (off !== undefined)
			return {
				ok: true,
				ts: local - offsetMinutes(off) * MINUTE_MS,
				ambiguous: false,
				offsetGiven: true
			};
		const instant = this.#toInstant(local);
		if (!instant.ok)
			return fail(`“${s}” does not exist in ${this.zone.name}: the clocks went forward over it`);
		return { ok: true, ts: instant.ts, ambiguous: instant.ambiguous, offsetGiven: false };
	}
}

export const isValidZone = (name: string) => IANAZone.isValidZone(name);

/**
 * The format the first values of a time column are written in. Day-first and
 * month-first look alike until a day above 12 shows up; with none, day-first
 * is suggested and `ambiguous` says the uploader must confirm it.
 */
export function detectTimeFormat(
	values: string[]
): { format: TimeFormat; ambiguous: boolean } | null {
	const vs = values.map((v) => v.trim()).filter(Boolean);
	if (vs.length === 0) return null;
	// a stray bad row must not hide the format of the rest: four in five values decide
	const most = (test: (v: string) => boolean) =>
		vs.filter(test).length >= Math.ceil(vs.length * 0.8);
	const numeric = vs.filter((v) => /^\d+(\.\d+)?$/.test(v));
	if (most((v) => /^\d+(\.\d+)?$/.test(v))) {
		// 1e11 ms is March 1973, 1e11 s is the year 5138: a 12-digit number is milliseconds
		return { format: Number(numeric[0]) >= 1e11 ? 'epoch_ms' : 'epoch_s', ambiguous: false };
	}
	if (most((v) => PATTERNS.iso.test(v))) return { format: 'iso', ambiguous: false };
	if (!most((v) => PATTERNS.dmy.test(v))) return null;
	const parts = vs.map((v) => PATTERNS.dmy.exec(v)).filter((m) => m !== null);
	if (parts.some((m) => Number(m[1]) > 12)) return { format: 'dmy', ambiguous: false };
	if (parts.some((m) => Number(m[2]) > 12)) return { format: 'mdy', ambiguous: false };
	if (vs.some((v) => /[AaPp][Mm]/.test(v))) return { format: 'mdy', ambiguous: true };
	return { format: 'dmy', ambiguous: true };
}
