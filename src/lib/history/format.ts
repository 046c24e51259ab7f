/**
 * Times and durations as history pages write them. An instant is given in
 * the vessel's zone (the clock the crew keeps) and in UTC (the clock of the
 * data and the exports), so a reader ashore and one on board mean the same.
 */

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(zone: string, seconds: boolean): Intl.DateTimeFormat {
	const key = `${zone}|${seconds}`;
	let f = formatters.get(key);
	if (!f) {
		f = new Intl.DateTimeFormat('en-GB', {
			timeZone: zone,
			year: 'numeric',
			month: '2-digit',
			day: '2-digit',
			hour: '2-digit',
			minute: '2-digit',
			...(seconds ? { second: '2-digit' } : {}),
			hourCycle: 'h23'
		});
		formatters.set(key, f);
	}
	return f;
}

/** "2026-03-29 14:05:07" in `zone`. */
export function formatZoned(ms: number, zone: string, options: { seconds?: boolean } = {}): string {
	const parts = Object.fromEntries(
		formatter(zone, options.seconds ?? true)
			.formatToParts(new Date(ms))
			.map((p) => [p.type, p.value])
	);
	const time = `${parts.hour}:${parts.minute}${options.seconds === false ? '' : `:${parts.second}`}`;
	return `${parts.year}-${parts.month}-${parts.day} ${time}`;
}

/** "2026-03-29 14:05:07 (Europe/Oslo) · 12:05:07 UTC", the date repeated only when it differs. */
export function formatBoth(ms: number, zone: string, options: { seconds?: boolean } = {}): string {
	const local = formatZoned(ms, zone, options);
	if (zone === 'UTC' || zone === 'Etc/UTC') return `${local} UTC`;
	const utc = formatZoned(ms, 'UTC', options);
	const utcShown = utc.slice(0, 10) === local.slice(0, 10) ? utc.slice(11) : utc;
	return `${local} (${zone}) · ${utcShown} UTC`;
}

/** "3 d 4 h", "1 h 05 min", "12 min 30 s", "45 s" */
export function formatDuration(seconds: number): string {
	const s = Math.round(seconds);
	if (s < 60) return `${s} s`;
	if (s < 3600)
		return `${Math.floor(s / 60)} min${s % 60 ? ` ${String(s % 60).padStart(2, '0')} s` : ''}`;
	if (s < 86_400) {
		const m = Math.floor((s % 3600) / 60);
		return `${Math.floor(s / 3600)} h${m ? ` ${String(m).padStart(2, '0')} min` : ''}`;
	}
	const h = Math.floor((s % 86_400) / 3600);
	return `${Math.floor(s / 86_400)} d${h ? ` ${h} h` : ''}`;
}

/**
 * A share as a percentage that never rounds a shortfall away: 0.99996 is
 * "99.99 %", not "100.00 %", because a report that says 100 % must mean it.
 */
export function formatShare(share: number | null | undefined, digits = 2): string {
	if (share === null || share === undefined || !Number.isFinite(share)) return '—';
	const f = 10 ** digits;
	const pct = Math.floor(share * 100 * f + 1e-9) / f;
	return `${pct.toFixed(digits)} %`;
}

/**
 * Time-axis labels in `zone`, 24-hour and year-month-day (the forms a log
 * book and an export use): the time of day, with the date under it at the
 * first tick and wherever the date changes; only dates when ticks are a day
 * or more apart.
 */
export function tickLabels(values: number[], zone: string, incrementMs: number): string[] {
	let lastDate = '';
	let lastYear = '';
	return values.map((v, i) => {
		const full = formatZoned(v, zone); // "2026-03-29 14:05:07"
		const date = full.slice(0, 10);
		const year = full.slice(0, 4);
		if (incrementMs >= 86_400_000) {
			const label = i === 0 || year !== lastYear ? date : date.slice(5);
			lastYear = year;
			return label;
		}
		const time = incrementMs < 60_000 ? full.slice(11, 19) : full.slice(11, 16);
		const label = i === 0 || date !== lastDate ? `${time}\n${date}` : time;
		lastDate = date;
		return label;
	});
}
