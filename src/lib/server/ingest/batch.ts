/**
 * What the ingest pipeline hands to the writer thread: flat numeric arrays
 * (transferred, not copied, to the worker) plus a few small lists.
 */
import type { MinimumSpan } from '$lib/minimums';

/** Fields of one sample row in `samples`: shaft_id, ts, flow_lpm, supply_bar, temp_c, shaft_rpm (NaN = absent) */
export const SAMPLE_STRIDE = 6;
/** Fields of one separator row: vessel_id, ts, dp_bar (NaN = absent), valve (−1 absent, 0 closed, 1 open) */
export const STATE_STRIDE = 4;

export interface ValveChange {
	vessel_id: number;
	ts: number;
	state: 'open' | 'closed';
	dp_bar: number | null;
}

export interface GatewayStatusRow {
	vessel_id: number;
	online: boolean;
	at: number;
}

export interface RejectedRow {
	at: number;
	topic: string;
	reason: string;
	detail: string | null;
	payload: string | null;
}

export interface WriteBatch {
	seq: number;
	samples: Float64Array;
	states: Float64Array;
	valves: ValveChange[];
	statuses: GatewayStatusRow[];
	rejected: RejectedRow[];
	/** newest gateway message time per vessel, for gateway_status.last_message_at */
	lastMessageAt: [number, number][];
}

export interface WriteResult {
	seq: number;
	stored: number;
	duplicates: number;
	late: number;
	states: number;
	stateDuplicates: number;
	ms: number;
}

/** Per shaft: the minimum flow in force and the gap beyond which time is unknown. */
/** the minimums over time (oldest first, the last one in force now) and the stale threshold */
export type ShaftRollupConfig = [shaftId: number, minimums: MinimumSpan[], gapMs: number];

export type ToWriter =
	| { type: 'config'; shafts: ShaftRollupConfig[] }
	| ({ type: 'batch' } & WriteBatch)
	| { type: 'retention'; samplesBefore: number; rejectedKeep: number }
	| { type: 'stop' };

export type FromWriter =
	| { type: 'ready' }
	| ({ type: 'done' } & WriteResult)
	| { type: 'failed'; seq: number; message: string }
	| { type: 'retention-done'; deleted: number }
	| { type: 'stopped' };
