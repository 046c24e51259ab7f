/**
 * Time-weighted flow compliance: how much of a period the bearing had at least
 * its minimum flow. Each sample holds its value until the next sample; a gap
 * longer than the stale threshold is unknown time — never counted as
 * compliant, never as non-compliant. The same rule builds the 1-minute and
 * 1-hour rollups (covered_ms, below_ms), so rollup-based and raw-based
 * compliance agree to the millisecond.
 */

export const MINUTE_MS = 60_000;
export const HOUR_MS = 3_600_000;

export const bucketOf = (ts: number, bucketMs: number) => Math.floor(ts / bucketMs) * bucketMs;

/** Splits [a, b) across buckets of `bucketMs`, calling add(bucketStart, ms) for each piece. */
export function splitInterval(
	a: number,
	b: number,
	bucketMs: number,
	add: (bucket: number, ms: number) => void
): void {
	let start = a;
	while (start < b) {
		const bucket = bucketOf(start, bucketMs);
		const end = Math.min(b, bucket + bucketMs);
		add(bucket, end - start);
		start = end;
	}
}

/**
 * The interval a sample at `ts` holds, given the next sample at `nextTs`:
 * [ts, nextTs) when the gap is no longer than `gapMs`, otherwise nothing.
 */
export function heldInterval(ts: number, nextTs: number, gapMs: number): [number, number] | null {
	const gap = nextTs - ts;
	return gap > 0 && gap <= gapMs ? [ts, nextTs] : null;
}

export interface FlowPoint {
	ts: number;
	/** flow below the minimum at this sample */
	below: boolean;
}

export interface Coverage {
	/** ms with a known flow */
	covered_ms: number;
	/** ms of covered_ms with flow below the minimum */
	below_ms: number;
}

/**
 * Coverage of [from, to) from samples sorted by ts. Include the last sample
 * before `from` (it may hold into the period) and the first at or after `to`
 * (it closes the last interval inside it).
 */
export function coverageFromPoints(points: FlowPoint[], from: number, to: number, gapMs: number): Coverage {
	let covered = 0;
	let below = 0;
	for (let i = 0; i + 1 < points.length; i++) {
		const held = heldInterval(points[i].ts, points[i + 1].ts, gapMs);
		if (!held) continue;
		const a = Math.max(held[0], from);
		const b = Math.min(held[1], to);
		if (b <= a) continue;
		covered += b - a;
		if (points[i].below) below += b - a;
	}
	return { covered_ms: covered, below_ms: below };
}

export interface ComplianceShares {
	period_ms: number;
	share_at_or_above_min: number;
	share_below_min: number;
	share_unknown: number;
	/** at or above the minimum as a share of the time with data; null when there was none */
	share_at_or_above_min_of_known: number | null;
	seconds_below_min: number;
	seconds_unknown: number;
}

export function sharesOf(coverage: Coverage, periodMs: number): ComplianceShares {
	const period = Math.max(0, periodMs);
	const covered = Math.min(coverage.covered_ms, period);
	const below = Math.min(coverage.below_ms, covered);
	const share = (ms: number) => (period > 0 ? ms / period : 0);
	return {
		period_ms: period,
		share_at_or_above_min: share(covered - below),
		share_below_min: share(below),
		share_unknown: share(period - covered),
		share_at_or_above_min_of_known: covered > 0 ? (covered - below) / covered : null,
		seconds_below_min: below / 1000,
		seconds_unknown: (period - covered) / 1000
	};
}
