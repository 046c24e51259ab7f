/** The alarm as the API, the live streams, the pages and the mail templates see it. */
import type { AlarmType, Priority } from './types';
import type { AlarmState } from './state-machine';

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
