/**
 * Separator ΔP around and between purges. A purge should drop ΔP; between purges it rises as
 * sediment collects, and a faster rise means dirtier water. When the rise would bring ΔP near the
 * alarm setpoint before the next purge, a shorter interval is suggested — only suggested: the
 * schedule changes when a technician changes it, with a reason, like any other change.
 */
import { formatInterval } from './describe';
import { MIN_INTERVAL_MIN } from './input';

export interface DpSample {
	/** epoch ms */
	at: number;
	dp_bar: number;
}

export interface PurgeEvent {
	/** epoch ms */
	opened_at: number;
	/** epoch ms */
	closed_at: number;
}

export interface TrendOptions {
	/** s: ΔP before a purge is the median over this long before opening; after, after closing */
	window_s: number;
	/** s: samples this soon after closing are left out of the rate (the closing pressure pulse) */
	settle_s: number;
	/** fewer samples than this between two purges give no rate */
	min_samples: number;
	/** s: samples spanning less than this give no rate (too short to tell a trend from noise) */
	min_span_s: number;
}

/** Chosen here, not published figures. */
export const DEFAULT_TREND_OPTIONS: Readonly<TrendOptions> = Object.freeze({
	window_s: 60,
	settle_s: 60,
	min_samples: 3,
	min_span_s: 600
});

/** Common practice: act while ΔP is still below 80 % of its alarm setpoint. */
export const DP_TARGET_FRACTION = 0.8;

/**
 * Intervals a suggestion rounds down to: they divide the day and keep the same minutes every
 * hour or day, so the schedule stays easy to read and has a cron form.
 */
export const SUGGESTED_INTERVALS_MIN = [15, 20, 30, 60, 120, 180, 240, 360, 480, 720, 1440];

/** Median of finite values; null when there are none. */
export function median(values: readonly number[]): number | null {
	const v = values.filter(Number.isFinite).sort((a, b) => a - b);
	if (v.length === 0) return null;
	const mid = Math.floor(v.length / 2);
	return v.length % 2 ? v[mid] : (v[mid - 1] + v[mid]) / 2;
}

/** Least-squares slope of ΔP over time, bar per hour; null for fewer than 2 distinct times. */
export function slopeBarPerHour(samples: readonly DpSample[]): number | null {
	const pts = samples.filter((s) => Number.isFinite(s.at) && Number.isFinite(s.dp_bar));
	if (pts.length < 2) return null;
	// Hours from the first sample keep the sums small enough for doubles to stay exact.
	const x0 = pts[0].at;
	const xs = pts.map((s) => (s.at - x0) / 3_600_000);
	const xMean = xs.reduce((a, b) => a + b, 0) / xs.length;
	const yMean = pts.reduce((a, s) => a + s.dp_bar, 0) / pts.length;
	let sxy = 0;
	let sxx = 0;
	pts.forEach((s, i) => {
		sxy += (xs[i] - xMean) * (s.dp_bar - yMean);
		sxx += (xs[i] - xMean) ** 2;
	});
	return sxx > 0 ? sxy / sxx : null;
}

export interface PurgeDp extends PurgeEvent {
	/** median ΔP over the window before opening; null without samples */
	dp_before_bar: number | null;
	/** median ΔP over the window after closing; null without samples */
	dp_after_bar: number | null;
	/** before − after: what the purge cleared */
	drop_bar: number | null;
}

export interface DpInterval {
	/** epoch ms: the previous purge closed */
	from_at: number;
	/** epoch ms: the next purge opened, or the last sample when none has yet */
	to_at: number;
	/** no purge has ended this interval yet */
	current: boolean;
	samples: number;
	rate_bar_per_h: number | null;
}

export interface DpTrend {
	purges: PurgeDp[];
	intervals: DpInterval[];
}

function opts(options?: Partial<TrendOptions>): TrendOptions {
	return { ...DEFAULT_TREND_OPTIONS, ...options };
}

/** ΔP just before and just after each purge, and the rate of rise between purges. */
export function dpTrend(
	samples: readonly DpSample[],
	purges: readonly PurgeEvent[],
	options?: Partial<TrendOptions>
): DpTrend {
	const o = opts(options);
	const windowMs = o.window_s * 1000;
	const sorted = samples.filter((s) => Number.isFinite(s.at)).sort((a, b) => a.at - b.at);
	const events = [...purges].sort((a, b) => a.opened_at - b.opened_at);
	const dpIn = (from: number, to: number) =>
		sorted.filter((s) => s.at >= from && s.at <= to).map((s) => s.dp_bar);

	const purgeDps = events.map((p): PurgeDp => {
		const before = median(dpIn(p.opened_at - windowMs, p.opened_at - 1));
		const after = median(dpIn(p.closed_at + 1, p.closed_at + windowMs));
		const drop = before !== null && after !== null ? before - after : null;
		return { ...p, dp_before_bar: before, dp_after_bar: after, drop_bar: drop };
	});

	const intervals: DpInterval[] = [];
	const lastAt = sorted.length ? sorted[sorted.length - 1].at : -Infinity;
	events.forEach((p, i) => {
		const next = events[i + 1];
		const to = next ? next.opened_at : lastAt;
		if (to <= p.closed_at) return;
		const inside = sorted.filter(
			(s) => s.at >= p.closed_at + o.settle_s * 1000 && (next ? s.at < to : s.at <= to)
		);
		const span = inside.length ? inside[inside.length - 1].at - inside[0].at : 0;
		const enough = inside.length >= o.min_samples && span >= o.min_span_s * 1000;
		intervals.push({
			from_at: p.closed_at,
			to_at: to,
			current: !next,
			samples: inside.length,
			rate_bar_per_h: enough ? slopeBarPerHour(inside) : null
		});
	});
	return { purges: purgeDps, intervals };
}

export interface IntervalSuggestion {
	interval_min: number;
	/** for the technician; says it is a suggestion */
	reason: string;
	/** the recent rate the suggestion rests on */
	rate_bar_per_h: number;
	/** 80 % of the alarm setpoint */
	target_bar: number;
	/** min after a purge until ΔP would reach the target at that rate */
	reach_min: number;
}

/**
 * A shorter interval when, at the recent rate of rise (median of the last three intervals'
 * rates, oldest first in `ratesBarPerH`, so one odd interval does not decide), ΔP starting from
 * its level after a purge would reach 80 % of the alarm setpoint before the next purge.
 * Null when it would not, when there is no rising rate, when the interval is already the
 * shortest, or when ΔP after a purge is already at or above that level: purging more often
 * cannot help then, the ΔP alarm and an inspection can.
 */
export function suggestInterval(
	currentIntervalMin: number,
	ratesBarPerH: readonly (number | null)[],
	dpMaxBar: number,
	currentDpAfterPurgeBar: number
): IntervalSuggestion | null {
	const recent = ratesBarPerH.filter((r): r is number => r !== null && Number.isFinite(r));
	const rate = median(recent.slice(-3));
	if (rate === null || !(rate > 0) || !(dpMaxBar > 0)) return null;
	if (!Number.isFinite(currentDpAfterPurgeBar)) return null;
	const target = DP_TARGET_FRACTION * dpMaxBar;
	const headroom = target - currentDpAfterPurgeBar;
	if (headroom <= 0) return null;
	const reachMin = (headroom / rate) * 60;
	if (reachMin >= currentIntervalMin) return null;

	const fitting = SUGGESTED_INTERVALS_MIN.filter((m) => m <= reachMin);
	const interval = fitting.length ? fitting[fitting.length - 1] : MIN_INTERVAL_MIN;
	// Already at the shortest interval: nothing to suggest; the ΔP alarm takes it from here.
	if (interval >= currentIntervalMin) return null;
	const reach = formatInterval(Math.max(1, Math.floor(reachMin)));
	const facts =
		`ΔP has been rising ${rate.toFixed(3)} bar/h between purges. From ${currentDpAfterPurgeBar.toFixed(2)} bar ` +
		`after a purge it would reach ${target.toFixed(2)} bar (80 % of the ${dpMaxBar.toFixed(2)} bar ` +
		`alarm setpoint) about ${reach} later, before the next purge ${formatInterval(currentIntervalMin)} later.`;
	const advice = fitting.length
		? ` Suggestion: purge every ${formatInterval(interval)}.`
		: ` Even every ${formatInterval(interval)} would not keep it below; suggestion: purge every ` +
			`${formatInterval(interval)} and inspect the separator.`;
	return {
		interval_min: interval,
		reason: `${facts}${advice} The schedule is not changed until you change it.`,
		rate_bar_per_h: rate,
		target_bar: target,
		reach_min: reachMin
	};
}
