/** What the live streams send (GET /api/vessels/{id}/live and GET /api/live). */
import type { AlarmType, Priority } from '$lib/alarms/types';
import type { AlarmState } from '$lib/alarms/state-machine';

/** [ts, flow_lpm, supply_bar, temp_c, shaft_rpm] */
export type SampleTuple = [number, number, number | null, number | null, number | null];
/** [ts, dp_bar, purge_valve] */
export type SeparatorTuple = [number, number | null, 'open' | 'closed' | null];

export interface LiveAlarm {
	id: number;
	vessel_id: number;
	shaft_id: number | null;
	type: AlarmType;
	label: string;
	priority: Priority;
	state: AlarmState;
	state_label: string;
	active: boolean;
	acknowledged: boolean;
	suppressed: boolean;
	out_of_service: boolean;
	shelved_until: number | null;
	raised_at: number;
	value: number | null;
	limit_value: number | null;
	acknowledged_at: number | null;
	acknowledged_by: string | null;
	ended_at: number | null;
}

export interface AlarmChange {
	alarm: LiveAlarm;
	transition: { event: string; from: AlarmState | null; to: AlarmState; at: number; actor: string; comment: string | null };
}

export interface GatewayState {
	online: boolean;
	at: number;
	last_message_at: number | null;
}

export interface PurgeSpan {
	opened_at: number;
	closed_at: number | null;
}

export interface ShaftLatest {
	ts: number;
	flow_lpm: number;
	supply_bar: number | null;
	temp_c: number | null;
	shaft_rpm: number | null;
}

export interface FleetSummary {
	now: number;
	vessels: Record<
		number,
		{
			gateway: GatewayState | null;
			separator: { ts: number; dp_bar: number | null; purge_valve: 'open' | 'closed' | null } | null;
			shafts: Record<number, ShaftLatest>;
		}
	>;
}

export type StreamStatus = 'connecting' | 'live' | 'reconnecting' | 'offline';
