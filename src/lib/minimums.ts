/**
 * A shaft's minimum flow over time. A change (a corrected diameter or factor)
 * applies from when it was made: samples measured before it are judged against
 * the minimum then in force, as the alarms of the time were. Raw samples are
 * kept only for a while, so judging the past against today's minimum could
 * not be done consistently anyway.
 */

/** one change, as kept in shaft_minimum_changes */
export interface MinimumChange {
	changed_at: number;
	from_lpm: number;
	to_lpm: number;
}

/** a minimum and the time it came into force (-Infinity: before any recorded change) */
export interface MinimumSpan {
	from_ts: number;
	min_flow_lpm: number;
}

/**
 * The minimums in force over time, oldest first, from the changes (sorted by
 * time) and the current minimum. With no change recorded, the current one
 * has always applied. The current minimum wins over the last change's `to_lpm`
 * should they differ (a change made outside Aftwater).
 */
export function minimumTimeline(changes: readonly MinimumChange[], currentLpm: number): MinimumSpan[] {
	if (!changes.length) return constantMinimum(currentLpm);
	const spans: MinimumSpan[] = [{ from_ts: -Infinity, min_flow_lpm: changes[0].from_lpm }];
	for (const c of changes) spans.push({ from_ts: c.changed_at, min_flow_lpm: c.to_lpm });
	spans[spans.length - 1].min_flow_lpm = currentLpm;
	return spans;
}

/** The minimum in force at `ts`. */
export function minimumAt(timeline: readonly MinimumSpan[], ts: number): number {
	let lo = 0;
	let hi = timeline.length - 1;
	while (lo < hi) {
		const mid = (lo + hi + 1) >> 1;
		if (timeline[mid].from_ts <= ts) lo = mid;
		else hi = mid - 1;
	}
	return timeline[lo].min_flow_lpm;
}

/** The spans in force at some time in [from, to), the first clipped to start at `from`. */
export function minimumsDuring(timeline: readonly MinimumSpan[], from: number, to: number): MinimumSpan[] {
	const out: MinimumSpan[] = [{ from_ts: from, min_flow_lpm: minimumAt(timeline, from) }];
	for (const s of timeline) if (s.from_ts > from && s.from_ts < to) out.push(s);
	return out;
}

/** One minimum that has always applied. */
export const constantMinimum = (minFlowLpm: number): MinimumSpan[] => [{ from_ts: -Infinity, min_flow_lpm: minFlowLpm }];
