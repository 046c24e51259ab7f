/** The alarm as the API, the pages and the mail templates see it. */
import { ALARM_TYPE_LABELS, type AlarmType, type Priority } from '$lib/alarms/types';
import { ALARM_STATE_LABELS, type AlarmState } from '$lib/alarms/state-machine';
import type { Selectable } from 'kysely';
import type { AlarmsTable } from '../db/tables/alarms';

export interface AlarmView {
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
	/** the reading that raised it, in SI (L/min, bar, °C) */
	value: number | null;
	/** the limit it crossed, in the same unit */
	limit_value: number | null;
	cleared_at: number | null;
	acknowledged_at: number | null;
	acknowledged_by: string | null;
	ended_at: number | null;
}

export function toAlarmView(row: Selectable<AlarmsTable>): AlarmView {
	return {
		id: row.id,
		vessel_id: row.vessel_id,
		shaft_id: row.shaft_id,
		type: row.type,
		label: ALARM_TYPE_LABELS[row.type] ?? row.type,
		priority: row.priority,
		state: row.state,
		state_label: ALARM_STATE_LABELS[row.state] ?? row.state,
		active: !!row.active,
		acknowledged: !!row.acknowledged,
		suppressed: !!row.suppressed,
		out_of_service: !!row.out_of_service,
		shelved_until: row.shelved_until,
		raised_at: row.raised_at,
		value: row.value,
		limit_value: row.limit_value,
		cleared_at: row.cleared_at,
		acknowledged_at: row.acknowledged_at,
		acknowledged_by: row.acknowledged_by,
		ended_at: row.ended_at
	};
}
