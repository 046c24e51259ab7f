/** Tables of the notification policy (migrations/20261201_0008_notify.ts). */
import type { ColumnType, Generated, Selectable } from 'kysely';
import type { AlarmType, Priority } from '$lib/alarms/types';

type EpochMs = number;

export interface VesselNotificationSettingsTable {
	vessel_id: number;
	/** an unacknowledged alarm-priority incident is e-mailed to the fleet managers after this */
	escalation_after_s: ColumnType<number, number | undefined, number>;
	/** a new alarm of the same shaft and type this soon after the last one ended is the same incident */
	incident_holdoff_s: ColumnType<number, number | undefined, number>;
	updated_at: EpochMs;
	updated_by: string | null;
}

/**
 * hidden: raised but not yet shown to anyone (suppressed, shelved, out of service) ·
 * pending: shown, its e-mail held for the vessel's batch (flood decision) ·
 * told: in a thread, e-mailed · covered: told by another incident (low-flow margin under low flow)
 */
export type IncidentPhase = 'hidden' | 'pending' | 'told' | 'covered';

/** One incident: an alarm of a shaft (or separator) and type, with the re-raises that chatter adds to it. */
export interface NotifyIncidentsTable {
	id: Generated<number>;
	vessel_id: number;
	shaft_id: number | null;
	type: AlarmType;
	priority: Priority;
	first_alarm_id: number;
	/** the alarm instance the incident follows now (the latest) */
	current_alarm_id: number;
	/** alarm instances in the incident: more than 1 means the shaft chattered */
	instances: ColumnType<number, number | undefined, number>;
	/** raise of the first instance */
	opened_at: EpochMs;
	phase: IncidentPhase;
	/** when it was first shown unacknowledged (the hold and the flood rate count from here) */
	annunciated_at: EpochMs | null;
	/** pending: when the vessel's batch is decided */
	due_at: EpochMs | null;
	thread_id: number | null;
	/** waiting for acknowledgement since (escalation clock); null when acknowledged or hidden */
	unacked_since: EpochMs | null;
	acknowledged_at: EpochMs | null;
	/** a person's name or e-mail, as the follow-up says it */
	acknowledged_by: string | null;
	ack_comment: string | null;
	/** the current instance returned to normal; null while it is open */
	ended_at: EpochMs | null;
	/** stayed normal for the hold-off: closed for good, a new alarm starts a new incident */
	closed_at: EpochMs | null;
}

export type ThreadKind = 'single' | 'flood';

/** One e-mail thread: a single incident, or the incidents of one flood summary. */
export interface NotifyThreadsTable {
	id: Generated<number>;
	vessel_id: number;
	kind: ThreadKind;
	/** mail_outbox.thread_key of every message in it */
	thread_key: string;
	told_at: EpochMs;
	escalated_at: EpochMs | null;
	ack_told_at: EpochMs | null;
	normal_told_at: EpochMs | null;
	closed_at: EpochMs | null;
}

/** Who was sent what in a thread, and when: the escalation's "who was told", the follow-ups' addressees. */
export interface NotifySendsTable {
	id: Generated<number>;
	thread_id: number;
	user_id: string;
	/** the mail kind: alarm_raised, alarm_flood, alarm_escalated, alarm_followup */
	kind: string;
	outbox_id: number;
	at: EpochMs;
}

/** One digest per user and local day, so a restart or a second tick never sends it twice. */
export interface NotifyDigestsTable {
	user_id: string;
	/** 'yyyy-MM-dd' in the zone the digest hour was read in */
	local_date: string;
	period_from: EpochMs;
	period_to: EpochMs;
	outbox_id: number | null;
	sent_at: EpochMs;
}

export interface NotifyTables {
	vessel_notification_settings: VesselNotificationSettingsTable;
	notify_incidents: NotifyIncidentsTable;
	notify_threads: NotifyThreadsTable;
	notify_sends: NotifySendsTable;
	notify_digests: NotifyDigestsTable;
}

export type IncidentRow = Selectable<NotifyIncidentsTable>;
export type ThreadRow = Selectable<NotifyThreadsTable>;
