/**
 * History answers → chart columns ([x in epoch ms, …y]), in the user's units.
 * Where the data has a hole (a gap longer than the stale threshold between
 * samples, a missing bucket) a null is put in, so the line breaks there
 * instead of drawing a straight line across time nobody measured.
 */
import type { HistoryBucket, HistorySample, Quantity } from './types';

export type Column = (number | null)[];
export type Columns = [number[], ...Column[]];

const ident = (v: number) => v;

/** [ts, value] for raw samples; a null at `ts + 1` after each gap longer than `gapMs`. */
export function sampleColumns(
	samples: HistorySample[],
	field: Quantity,
	gapMs: number,
	convert: (si: number) => number = ident
): Columns {
	const xs: number[] = [];
	const ys: Column = [];
	for (let i = 0; i < samples.length; i++) {
		const s = samples[i];
		if (i > 0 && s.ts - samples[i - 1].ts > gapMs) {
			xs.push(samples[i - 1].ts + 1);
			ys.push(null);
		}
		const v = s[field];
		xs.push(s.ts);
		ys.push(v === null ? null : convert(v));
	}
	return [xs, ys];
}

/**
 * [bucket start, mean, min, max] for buckets; a null row where a bucket is
 * missing or held no sample of the quantity.
 */
export function bucketColumns(
	buckets: HistoryBucket[],
	field: Quantity,
	bucketMs: number,
	convert: (si: number) => number = ident
): Columns {
	const xs: number[] = [];
	const mean: Column = [];
	const min: Column = [];
	const max: Column = [];
	for (let i = 0; i < buckets.length; i++) {
		const b = buckets[i];
		if (i > 0 && b.ts - buckets[i - 1].ts > bucketMs) {
			xs.push(buckets[i - 1].ts + bucketMs);
			mean.push(null);
			min.push(null);
			max.push(null);
		}
		const s = b[field];
		xs.push(b.ts);
		mean.push(s ? convert(s.mean) : null);
		min.push(s ? convert(s.min) : null);
		max.push(s ? convert(s.max) : null);
	}
	return [xs, mean, min, max];
}

/** Lowest and highest of the finite values in columns 1…, or null without any. */
export function valueRange(cols: Columns): [number, number] | null {
	let lo = Infinity;
	let hi = -Infinity;
	for (let c = 1; c < cols.length; c++) {
		for (const v of cols[c]) {
			if (v === null || !Number.isFinite(v)) continue;
			if (v < lo) lo = v;
			if (v > hi) hi = v;
		}
	}
	return lo <= hi ? [lo, hi] : null;
}
