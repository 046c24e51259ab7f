/** From a stored alarm row to the AlarmView the API, pages and mail templates see. */
import { ALARM_TYPE_LABELS } from '$lib/alarms/types';
import { ALARM_STATE_LABELS } from '$lib/alarms/state-machine';
import type { Selectable } from 'kysely';
import type { AlarmView } from '$lib/alarms/view';
import type { AlarmsTable } from '../db/tables/alarms';

export type { AlarmView };

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
