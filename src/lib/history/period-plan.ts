/**
 * Compliance of any period from rollups, exactly. A period [from, to) is cut
 * into whole 1-hour buckets, whole 1-minute buckets beside them, and at most
 * two partial minutes at its edges. The rollups' covered_ms/below_ms already
 * hold each bucket's sample-hold coverage (src/lib/compliance.ts, intervals
 * attributed to the bucket they fall in), and coverage adds up over disjoint
 * intervals, so
 *
 *   coverage(from, to) = Σ hours + Σ minutes + coverage of the edges from raw rows
 *
 * is the same number coverageFromPoints gives over every raw row — while a
 * request reads at most ~8 800 hour rows a year, 118 minute rows and under
 * two minutes of raw samples.
 */
import { bucketOf, coverageFromPoints, HOUR_MS, MINUTE_MS, type Coverage } from '../compliance';
import { minimumAt, type MinimumSpan } from '../minimums';

export interface Span {
	from: number;
	to: number;
}

export interface PeriodPlan {
	/** partial minutes at the edges, read from raw samples (each shorter than a minute) */
	raw: Span[];
	/** whole minutes outside whole hours, read from rollup_1m */
	minutes: Span[];
	/** whole hours, read from rollup_1h */
	hours: Span | null;
}

const ceilTo = (t: number, size: number) => {
	const b = bucketOf(t, size);
	return b === t ? t : b + size;
};

/** Cuts [from, to) into whole hours, whole minutes and partial-minute edges; the pieces tile the period. */
export function planPeriod(from: number, to: number): PeriodPlan {
	const plan: PeriodPlan = { raw: [], minutes: [], hours: null };
	if (!(to > from)) return plan;
	const m0 = ceilTo(from, MINUTE_MS);
	const m1 = bucketOf(to, MINUTE_MS);
	if (m0 >= m1) {
		// no whole minute inside: one or two partial minutes
		if (m0 === m1) {
			if (from < m0) plan.raw.push({ from, to: m0 });
			if (m1 < to) plan.raw.push({ from: m1, to });
		} else {
			plan.raw.push({ from, to });
		}
		return plan;
	}
	if (from < m0) plan.raw.push({ from, to: m0 });
	const h0 = ceilTo(m0, HOUR_MS);
	const h1 = bucketOf(m1, HOUR_MS);
	if (h0 < h1) {
		if (m0 < h0) plan.minutes.push({ from: m0, to: h0 });
		plan.hours = { from: h0, to: h1 };
		if (h1 < m1) plan.minutes.push({ from: h1, to: m1 });
	} else {
		plan.minutes.push({ from: m0, to: m1 });
	}
	if (m1 < to) plan.raw.push({ from: m1, to });
	return plan;
}

/** What one piece of a period contributes: its coverage and its lowest sample. */
export interface PieceSummary extends Coverage {
	/** lowest flow of a sample inside the piece, L/min; null without samples */
	flow_min: number | null;
	/** epoch ms of that sample */
	flow_min_at: number | null;
}

export const EMPTY_PIECE: PieceSummary = {
	covered_ms: 0,
	below_ms: 0,
	flow_min: null,
	flow_min_at: null
};

/**
 * Sums pieces; the lowest flow is the lowest of theirs, the earlier on a tie
 * (a rollup keeps the first sample that reached its minimum).
 */
export function combinePieces(pieces: PieceSummary[]): PieceSummary {
	let covered = 0;
	let below = 0;
	let min: number | null = null;
	let at: number | null = null;
	for (const p of pieces) {
		covered += p.covered_ms;
		below += p.below_ms;
		if (p.flow_min === null) continue;
		if (
			min === null ||
			p.flow_min < min ||
			(p.flow_min === min && (p.flow_min_at ?? Infinity) < (at ?? Infinity))
		) {
			min = p.flow_min;
			at = p.flow_min_at;
		}
	}
	return { covered_ms: covered, below_ms: below, flow_min: min, flow_min_at: at };
}

export interface RawPoint {
	ts: number;
	flow_lpm: number;
}

/**
 * One partial-minute edge from raw rows: `points` are the samples inside the
 * span, plus the last one before it (it may hold into the span) and the first
 * at or after its end (it closes the last interval), sorted by ts.
 */
export function edgePiece(
	points: RawPoint[],
	span: Span,
	gapMs: number,
	minimums: readonly MinimumSpan[]
): PieceSummary {
	const cov = coverageFromPoints(
		points.map((p) => ({ ts: p.ts, below: p.flow_lpm < minimumAt(minimums, p.ts) })),
		span.from,
		span.to,
		gapMs
	);
	let min: number | null = null;
	let at: number | null = null;
	for (const p of points) {
		if (p.ts < span.from || p.ts >= span.to) continue;
		if (min === null || p.flow_lpm < min) {
			min = p.flow_lpm;
			at = p.ts;
		}
	}
	return { ...cov, flow_min: min, flow_min_at: at };
}

/** Length of the period covered by a plan's pieces (equals to − from: the pieces tile it). */
export function planLength(plan: PeriodPlan): number {
	const len = (s: Span) => s.to - s.from;
	return (
		plan.raw.reduce((a, s) => a + len(s), 0) +
		plan.minutes.reduce((a, s) => a + len(s), 0) +
		(plan.hours ? len(plan.hours) : 0)
	);
}
