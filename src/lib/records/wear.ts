/**
 * Wear-down of a stern-tube bearing, read over the years with a poker gauge
 * (or a fixed sensor) at the same station. Wear is each reading less the
 * baseline taken at installation; a straight line fitted to wear against time
 * (least squares) gives the rate and the date the wear limit would be reached
 * at that rate. The limit is the bearing maker's or the class society's figure.
 * A projection is a planning aid, not a survey result.
 */

export const MS_PER_YEAR = 365.25 * 24 * 3600 * 1000; // Julian year

export interface WearReading {
	/** epoch ms */
	measured_at: number;
	/** the gauge reading, mm (larger = more worn) */
	reading_mm: number;
}

export interface WearPoint extends WearReading {
	wear_mm: number;
}

export interface WearTrend {
	/** the earliest reading: installation */
	baseline: WearReading | null;
	points: WearPoint[];
	/** fitted wear rate, mm per year; null with fewer than two readings on different days */
	rate_mm_per_year: number | null;
	/** the fitted line's wear at the baseline's time, mm (wear = intercept + rate × years since) */
	intercept_mm: number | null;
	/** wear of the latest reading */
	latest_wear_mm: number | null;
	limit_mm: number | null;
	/** limit − latest wear */
	remaining_mm: number | null;
	/** where the fitted line reaches the limit (epoch ms), when it rises */
	projected_limit_at: number | null;
	state: 'no_readings' | 'ok' | 'at_limit';
}

/** Least-squares line y = a + b·x through the points. */
export function fitLine(xs: number[], ys: number[]): { intercept: number; slope: number } | null {
	const n = xs.length;
	if (n < 2) return null;
	const mx = xs.reduce((s, x) => s + x, 0) / n;
	const my = ys.reduce((s, y) => s + y, 0) / n;
	let sxx = 0;
	let sxy = 0;
	for (let i = 0; i < n; i++) {
		sxx += (xs[i] - mx) ** 2;
		sxy += (xs[i] - mx) * (ys[i] - my);
	}
	if (sxx === 0) return null;
	const slope = sxy / sxx;
	return { intercept: my - slope * mx, slope };
}

export function wearTrend(readings: WearReading[], limitMm: number | null): WearTrend {
	const sorted = [...readings].sort((a, b) => a.measured_at - b.measured_at);
	if (sorted.length === 0) {
		return {
			baseline: null,
			points: [],
			rate_mm_per_year: null,
			intercept_mm: null,
			latest_wear_mm: null,
			limit_mm: limitMm,
			remaining_mm: null,
			projected_limit_at: null,
			state: 'no_readings'
		};
	}
	const baseline = sorted[0];
	const points = sorted.map((r) => ({ ...r, wear_mm: r.reading_mm - baseline.reading_mm }));
	// fit in years from the baseline, so the numbers stay well conditioned
	const years = points.map((p) => (p.measured_at - baseline.measured_at) / MS_PER_YEAR);
	const line = fitLine(
		years,
		points.map((p) => p.wear_mm)
	);
	const latest = points[points.length - 1].wear_mm;
	let projected: number | null = null;
	if (line && limitMm != null && line.slope > 0) {
		const yearsAtLimit = (limitMm - line.intercept) / line.slope;
		projected = Math.round(baseline.measured_at + yearsAtLimit * MS_PER_YEAR);
	}
	return {
		baseline,
		points,
		rate_mm_per_year: line ? line.slope : null,
		intercept_mm: line ? line.intercept : null,
		latest_wear_mm: latest,
		limit_mm: limitMm,
		remaining_mm: limitMm == null ? null : limitMm - latest,
		projected_limit_at: projected,
		state: limitMm != null && latest >= limitMm ? 'at_limit' : 'ok'
	};
}
