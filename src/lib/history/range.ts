/**
 * Periods of history: how a period is written in a URL or an API query, the
 * presets of the range picker, and which resolution a chart of a period reads.
 * Shared by the browser (range picker, URL) and the server (API queries).
 */
import { DateTime } from 'luxon';
import { HOUR_MS, MINUTE_MS } from '../compliance';

export const DAY_MS = 86_400_000;

/** No request reads more than a day of raw rows (PERFORMANCE.md: a day of raw takes 90 ms, from rollups 6 ms). */
export const RAW_MAX_MS = DAY_MS;

/** The longest period any history request may ask for: 20 years. */
export const MAX_PERIOD_MS = 20 * 366 * DAY_MS;

export const BUCKETS = ['raw', '1m', '1h'] as const;
export type Bucket = (typeof BUCKETS)[number];

export const BUCKET_MS: Record<Bucket, number> = { raw: 0, '1m': MINUTE_MS, '1h': HOUR_MS };

/**
 * The longest period one samples request may cover at each resolution, so no answer is larger
 * than a few tens of thousands of points (a month of minutes: 44 640; five years of hours:
 * 43 848): the answer is built and encoded on the thread that also serves the broker and
 * the live view. Longer periods are for the CSV export, which streams.
 */
export const BUCKET_MAX_MS: Record<Bucket, number> = {
	raw: RAW_MAX_MS,
	'1m': 31 * DAY_MS,
	'1h': 5 * 366 * DAY_MS
};
export const BUCKET_MAX_WORDS: Record<Bucket, string> = { raw: 'one day', '1m': '31 days', '1h': 'five years' };

export const BUCKET_LABELS: Record<Bucket, string> = {
	raw: 'every sample',
	'1m': '1-minute buckets',
	'1h': '1-hour buckets'
};

/**
 * The resolution a chart of [from, to) reads: raw up to 3 h (about 10 800
 * points at 1 Hz), 1-minute buckets up to 8 days (11 520), 1-hour buckets
 * beyond (8 784 for a leap year). Each stays within what uPlot draws at once
 * without thinning (its README: 150 000 points in about 90 ms).
 */
export function autoBucket(from: number, to: number): Bucket {
	const span = to - from;
	if (span <= 3 * HOUR_MS) return 'raw';
	if (span <= 8 * DAY_MS) return '1m';
	return '1h';
}

/** The finest resolution allowed for a span, for the message that refuses a span too long for its bucket. */
export function suggestedBucket(from: number, to: number): Bucket {
	return to - from <= RAW_MAX_MS ? 'raw' : to - from <= 8 * DAY_MS ? '1m' : '1h';
}

/** the largest time value a JavaScript Date holds: 100 000 000 days either side of 1970 */
/** ms: the furthest a Date reaches either side of 1970 (ECMA-262 §21.4.1.1) */
export const MAX_TIME_MS = 8.64e15;

const ISO_WITH_OFFSET =
	/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:[.,]\d{1,9})?)?(?:Z|[+-]\d{2}(?::?\d{2})?)$/i;

/**
 * An instant from a query parameter: ISO 8601 with a zone designator (Z or
 * ±hh:mm), or an integer of epoch milliseconds. A time without a zone is
 * refused (null): it would mean a different instant on every server.
 */
export function parseInstant(text: string): number | null {
	const s = text.trim();
	if (/^-?\d{1,16}$/.test(s)) {
		const n = Number(s);
		// beyond ±8.64e15 ms a Date is invalid (ECMA-262 §21.4.1.1, "Time Values and Time Range")
		return Number.isSafeInteger(n) && Math.abs(n) <= MAX_TIME_MS ? n : null;
	}
	if (!ISO_WITH_OFFSET.test(s)) return null;
	const dt = DateTime.fromISO(s, { setZone: true });
	return dt.isValid ? dt.toMillis() : null;
}

export const PRESETS = [
	{ key: '1h', label: '1 hour', ms: HOUR_MS },
	{ key: '24h', label: '24 hours', ms: DAY_MS },
	{ key: '7d', label: '7 days', ms: 7 * DAY_MS },
	{ key: '30d', label: '30 days', ms: 30 * DAY_MS },
	{ key: '1y', label: '1 year', ms: 365 * DAY_MS }
] as const;
export type PresetKey = (typeof PRESETS)[number]['key'];

export const presetOf = (key: string) => PRESETS.find((p) => p.key === key);

export interface Period {
	from: number;
	to: number;
	/** the preset the period came from (a period ending now), or null for a fixed one */
	preset: PresetKey | null;
}

/**
 * The period a page URL names: `range=<preset>` (ending now) or `from=&to=`
 * (fixed, so a shared link shows the same data). Anything unreadable falls
 * back to `fallback`, so a mangled link still opens a page.
 */
export function periodFromQuery(
	params: URLSearchParams,
	now: number,
	fallback: PresetKey = '24h'
): Period {
	const from = params.get('from');
	const to = params.get('to');
	if (from && to) {
		const a = parseInstant(from);
		const b = parseInstant(to);
		if (a !== null && b !== null && a < b && b - a <= MAX_PERIOD_MS)
			return { from: a, to: b, preset: null };
	}
	const preset = presetOf(params.get('range') ?? '') ?? presetOf(fallback)!;
	return { from: now - preset.ms, to: now, preset: preset.key };
}

/** Query parameters for a period: the preset's key, or both ends in ISO 8601 UTC. */
export function periodQuery(period: Period): Record<string, string> {
	if (period.preset) return { range: period.preset };
	return { from: new Date(period.from).toISOString(), to: new Date(period.to).toISOString() };
}

/** Zooms [from, to) by `factor` about its middle (factor 2 = twice as long), never past `now`. */
export function zoomPeriod(
	from: number,
	to: number,
	factor: number,
	now: number
): { from: number; to: number } {
	const mid = (from + to) / 2;
	const half = Math.max(MINUTE_MS, ((to - from) * factor) / 2);
	let a = Math.round(mid - half);
	let b = Math.round(mid + half);
	if (b > now) {
		a -= b - now;
		b = now;
	}
	return { from: a, to: b };
}

/** Moves [from, to) by `share` of its length (−1 = one period earlier), never past `now`. */
export function shiftPeriod(
	from: number,
	to: number,
	share: number,
	now: number
): { from: number; to: number } {
	const len = to - from;
	let delta = Math.round(len * share);
	if (to + delta > now) delta = now - to;
	return { from: from + delta, to: to + delta };
}
