import { describe, expect, it } from 'vitest';
import { bucketColumns, sampleColumns, valueRange } from './chart-data';
import type { HistoryBucket } from './types';

describe('sampleColumns', () => {
	it('breaks the line at a gap longer than the stale threshold', () => {
		const s = (ts: number, flow: number) => ({
			ts,
			flow_lpm: flow,
			supply_bar: null,
			temp_c: null,
			shaft_rpm: null
		});
		// 0 s, 1 s, then 40 s (a 39 s gap > 30 s), then 41 s
		const cols = sampleColumns(
			[s(0, 1), s(1000, 2), s(40_000, 3), s(41_000, 4)],
			'flow_lpm',
			30_000
		);
		expect(cols).toEqual([
			[0, 1000, 1001, 40_000, 41_000],
			[1, 2, null, 3, 4]
		]);
		// supply pressure not reported: nulls, no break needed
		expect(sampleColumns([s(0, 1)], 'supply_bar', 30_000)).toEqual([[0], [null]]);
	});
	it('converts to the display unit', () => {
		// NIST SP 811: 3.785411784 L per US gallon → 37.85411784 L/min is 10 gpm
		const cols = sampleColumns(
			[{ ts: 0, flow_lpm: 37.85411784, supply_bar: null, temp_c: null, shaft_rpm: null }],
			'flow_lpm',
			30_000,
			(v) => v / 3.785411784
		);
		expect(cols[1][0]).toBeCloseTo(10, 12);
	});
});

describe('bucketColumns', () => {
	const b = (ts: number, min: number, max: number, mean: number): HistoryBucket => ({
		ts,
		n: 60,
		flow_lpm: { min, max, mean },
		supply_bar: null,
		temp_c: null,
		shaft_rpm: null,
		seconds_below_min: 0,
		covered_s: 60
	});
	it('gives mean, min and max, with a null where a bucket is missing', () => {
		const cols = bucketColumns(
			[b(0, 1, 3, 2), b(60_000, 2, 4, 3), b(180_000, 5, 7, 6)],
			'flow_lpm',
			60_000
		);
		expect(cols).toEqual([
			[0, 60_000, 120_000, 180_000],
			[2, 3, null, 6],
			[1, 2, null, 5],
			[3, 4, null, 7]
		]);
		expect(valueRange(cols)).toEqual([1, 7]);
		expect(valueRange([[0], [null]])).toBeNull();
	});
});
