/** Tables of the alarms concern (migrations/20261201_0003_alarms.ts). */
import type { Generated } from 'kysely';
import type { AlarmType, Priority } from '$lib/alarms/types';
import type { AlarmState } from '$lib/alarms/state-machine';

export interface AlarmSettingsTable {
	shaft_id: number;
	/** JSON of the alarmSettings schema ($lib/alarms/settings) */
	settings: string;
	updated_at: number;
	updated_by: string | null;
}

export interface VesselAlarmSettingsTable {
	vessel_id: number;
	/** JSON: the separator's alarm settings (the separator_* fields of alarmSettings) */
	settings: string;
	updated_at: number;
	updated_by: string | null;
}

export interface AlarmsTable {
	id: Generated<number>;
	vessel_id: number;
	/** null for the vessel's separator alarms */
	shaft_id: number | null;
	type: AlarmType;
	priority: Priority;
	state: AlarmState;
	active: number;
	acknowledged: number;
	shelved_until: number | null;
	suppressed: number;
	out_of_service: number;
	raised_at: number;
	value: number | null;
	limit_value: number | null;
	last_value: number | null;
	cleared_at: number | null;
	acknowledged_at: number | null;
	acknowledged_by: string | null;
	/** returned to normal; the instance is closed */
	ended_at: number | null;
	updated_at: number;
}

export interface AlarmEventsTable {
	id: Generated<number>;
	alarm_id: number;
	at: number;
	/** raise, clear, acknowledge, shelve, unshelve, shelve_expired, suppress, unsuppress, remove_from_service, return_to_service */
	event: string;
	from_state: AlarmState | null;
	to_state: AlarmState;
	user_id: string | null;
	actor: string;
	value: number | null;
	comment: string | null;
}

export interface AlarmRemovalsTable {
	id: Generated<number>;
	vessel_id: number;
	shaft_id: number | null;
	type: AlarmType;
	reason: string;
	removed_at: number;
	removed_by: string;
	returned_at: number | null;
	returned_by: string | null;
}

export interface AlarmsTables {
	alarm_settings: AlarmSettingsTable;
	vessel_alarm_settings: VesselAlarmSettingsTable;
	alarms: AlarmsTable;
	alarm_events: AlarmEventsTable;
	alarm_removals: AlarmRemovalsTable;
}
