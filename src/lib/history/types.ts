/** Shapes of the history API's answers, shared by the server that builds them and the pages that read them. */
import type { AlarmType, Priority } from '../alarms/types';
import type { AlarmSummary, PurgeOutcome, PurgeSummary } from './alarm-time';
import type { Bucket } from './range';

export interface HistorySample {
	ts: number;
	flow_lpm: number;
	supply_bar: number | null;
	temp_c: number | null;
	shaft_rpm: number | null;
}

export interface Stat {
	min: number;
	max: number;
	mean: number;
}

export interface HistoryBucket {
	/** bucket start, epoch ms */
	ts: number;
	/** samples in the bucket */
	n: number;
	flow_lpm: Stat | null;
	supply_bar: Stat | null;
	temp_c: Stat | null;
	shaft_rpm: Stat | null;
	/** time with flow below the minimum in force when the samples were stored */
	seconds_below_min: number;
	/** time with a known flow (sample-hold over gaps no longer than the stale threshold) */
	covered_s: number;
}

interface HistoryHead {
	shaft_id: number;
	bucket: Bucket;
	from: number;
	to: number;
	min_flow_lpm: number;
	margin_warning: number;
	stale_after_s: number;
}

export type HistoryResponse = HistoryHead &
	({ samples: HistorySample[] } | { buckets: HistoryBucket[] });

export type Quantity = 'flow_lpm' | 'supply_bar' | 'temp_c' | 'shaft_rpm';

/** rows a compliance figure was computed from, by source */
export interface CoverageRead {
	hour_rows: number;
	minute_rows: number;
	raw_rows: number;
}

export interface AlarmItem {
	id: number;
	/** null for the separator's alarms */
	shaft_id: number | null;
	type: AlarmType;
	priority: Priority;
	state: string;
	raised_at: number;
	ended_at: number | null;
	value: number | null;
	limit_value: number | null;
}

export interface PurgeItem {
	id: string;
	requested_at: number;
	requested_by: string;
	source: 'schedule' | 'manual';
	outcome: PurgeOutcome;
	finding: string | null;
	duration_s: number;
	opened_at: number | null;
	closed_at: number | null;
}

export interface ShaftCompliance {
	shaft_id: number;
	from: number;
	/** the end of the period, held at now when later */
	to: number;
	requested_to: number;
	period_s: number;
	/** the minimum in force at the end of the period */
	min_flow_lpm: number;
	/**
	 * every minimum in force during the period, oldest first, the first from `from`: more than one when
	 * the shaft's minimum was changed meanwhile; each sample is judged by the one in force when measured
	 */
	minimums: { from_ts: number; min_flow_lpm: number }[];
	stale_after_s: number;
	share_at_or_above_min: number;
	share_below_min: number;
	share_unknown: number;
	/** at or above the minimum as a share of the time with data (null: no data in the period) */
	share_at_or_above_min_of_known: number | null;
	seconds_at_or_above_min: number;
	seconds_below_min: number;
	seconds_unknown: number;
	min_flow_lpm_observed: number | null;
	min_flow_at: number | null;
	read: CoverageRead;
	alarms: AlarmSummary & { items?: AlarmItem[]; items_truncated?: boolean };
	purges: PurgeSummary & { items?: PurgeItem[]; items_truncated?: boolean };
}
