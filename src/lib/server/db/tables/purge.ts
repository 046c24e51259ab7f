/** Tables of the purge concern (migrations/20261201_0005_purge.ts). */
export type PurgeOutcome = 'pending' | 'done' | 'missed' | 'valve_stuck_open';

export interface PurgeSchedulesTable {
	vessel_id: number;
	enabled: number;
	interval_min: number;
	duration_s: number;
	offset_min: number;
	/** JSON [{from: "HH:MM", to: "HH:MM"}] in the vessel's time zone */
	quiet_hours: string;
	updated_at: number;
	updated_by: string | null;
}

export interface PurgeCommandsTable {
	/** the id in the command payload */
	id: string;
	vessel_id: number;
	requested_at: number;
	/** an e-mail address, or 'schedule' */
	requested_by: string;
	user_id: string | null;
	source: 'schedule' | 'manual';
	duration_s: number;
	outcome: PurgeOutcome;
	/** why, in judgePurge's words: not_opened, closed_in_time, open_too_long, … */
	finding: string | null;
	opened_at: number | null;
	closed_at: number | null;
	decided_at: number | null;
	dp_before_bar: number | null;
	dp_after_bar: number | null;
}

export interface PurgeTables {
	purge_schedules: PurgeSchedulesTable;
	purge_commands: PurgeCommandsTable;
}
