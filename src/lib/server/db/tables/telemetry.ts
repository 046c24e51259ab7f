/** Tables of the telemetry concern (migrations/20261201_0002_telemetry.ts). */
import type { Generated } from 'kysely';

export interface SamplesTable {
	shaft_id: number;
	/** epoch ms, from the gateway */
	ts: number;
	flow_lpm: number;
	supply_bar: number | null;
	temp_c: number | null;
	shaft_rpm: number | null;
}

export interface RollupTable {
	shaft_id: number;
	/** epoch ms of the bucket start */
	bucket: number;
	n: number;
	flow_min: number | null;
	flow_min_at: number | null;
	flow_max: number | null;
	flow_sum: number;
	supply_n: number;
	supply_min: number | null;
	supply_max: number | null;
	supply_sum: number;
	temp_n: number;
	temp_min: number | null;
	temp_max: number | null;
	temp_sum: number;
	rpm_n: number;
	rpm_min: number | null;
	rpm_max: number | null;
	rpm_sum: number;
	/** ms of the bucket with a known flow (sample-hold over gaps no longer than the stale threshold) */
	covered_ms: number;
	/** ms of covered_ms with flow below the shaft's minimum in force at ingest */
	below_ms: number;
}

export interface SeparatorStatesTable {
	vessel_id: number;
	ts: number;
	dp_bar: number | null;
	purge_valve: 'open' | 'closed' | null;
}

export interface SeparatorRollupTable {
	vessel_id: number;
	bucket: number;
	n: number;
	dp_min: number | null;
	dp_max: number | null;
	dp_sum: number;
}

export interface ValveEventsTable {
	id: Generated<number>;
	vessel_id: number;
	opened_at: number;
	closed_at: number | null;
	dp_before_bar: number | null;
}

export interface GatewayStatusTable {
	vessel_id: number;
	online: number;
	changed_at: number;
	last_message_at: number | null;
}

export interface RejectedMessagesTable {
	id: Generated<number>;
	at: number;
	topic: string;
	reason: string;
	detail: string | null;
	/** the first 1 KB of the payload, as text */
	payload: string | null;
}

export interface TelemetryTables {
	samples: SamplesTable;
	rollup_1m: RollupTable;
	rollup_1h: RollupTable;
	separator_states: SeparatorStatesTable;
	separator_rollup_1m: SeparatorRollupTable;
	separator_rollup_1h: SeparatorRollupTable;
	valve_events: ValveEventsTable;
	gateway_status: GatewayStatusTable;
	rejected_messages: RejectedMessagesTable;
}
