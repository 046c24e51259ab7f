/** What the live streams send (GET /api/vessels/{id}/live and GET /api/live). */
import type { AlarmState } from '$lib/alarms/state-machine';
import type { AlarmView } from '$lib/alarms/view';

/** [ts, flow_lpm, supply_bar, temp_c, shaft_rpm] */
export type SampleTuple = [number, number, number | null, number | null, number | null];
/** [ts, dp_bar, purge_valve] */
export type SeparatorTuple = [number, number | null, 'open' | 'closed' | null];

/** an alarm as the streams send it (the same shape as the API's) */
export type LiveAlarm = AlarmView;

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
