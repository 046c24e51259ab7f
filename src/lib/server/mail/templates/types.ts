/**
 * What each kind of e-mail needs to say. Every template renders one of these
 * into {subject, text, html}; callers build the data, queue the result with
 * enqueueMail(), and never write mail text themselves.
 *
 * Quantities are SI, as stored (L/min, bar, °C): the template converts them to
 * the recipient's unit system. Times are epoch milliseconds: the template shows
 * them in the vessel's time zone and in UTC.
 */
import type { Quantity } from '$lib/units';
import type { UnitSystem } from '$lib/types';

/** Marine alert categories (IMO Code on Alerts and Indicators) */
export type MailPriority = 'alarm' | 'warning' | 'caution';
export const MAIL_PRIORITIES = [
	'alarm',
	'warning',
	'caution'
] as const satisfies readonly MailPriority[];

/** The rules of DESIGN.md §2.3, in words an engineer reads in a subject line. */
export const ALARM_CONDITION_LABELS = {
	low_flow: 'Low flow',
	low_flow_margin: 'Low flow margin',
	low_supply_pressure: 'Low supply pressure',
	separator_dp_high: 'Separator differential pressure high',
	purge_missed: 'Purge missed',
	purge_valve_stuck_open: 'Purge valve stuck open',
	stale_data: 'No data from the gateway',
	implausible_value: 'Implausible value (sensor fault)',
	water_temp_high: 'Water temperature high'
} as const;
export type AlarmCondition = keyof typeof ALARM_CONDITION_LABELS;

/** Who reads the message: their name for the greeting, their units for every figure. */
export interface MailRecipient {
	name: string;
	units: UnitSystem;
}

export interface MailVessel {
	id: number;
	name: string;
	/** IANA zone (vessels.time_zone) */
	timeZone: string;
}

export interface MailShaft {
	id: number;
	name: string;
}

/** A reading against the limit it broke. */
export interface MeasuredAgainstLimit {
	quantity: Quantity;
	/** SI; null when there is no trustworthy reading (stale data, sensor fault) */
	valueSi: number | null;
	limitSi: number;
	/** low flow and pressure break a minimum; ΔP and temperature a maximum */
	limit: 'minimum' | 'maximum';
}

/** One alarm as an e-mail tells it. */
export interface AlarmFacts {
	alarmId: number;
	priority: MailPriority;
	condition: AlarmCondition;
	vessel: MailVessel;
	/** null for a vessel-wide condition (separator, gateway): the link goes to the vessel */
	shaft: MailShaft | null;
	/** null when the condition has no reading (purge missed) */
	measured: MeasuredAgainstLimit | null;
	/** when the condition began (epoch ms) */
	since: number;
	/** one line from the rule, e.g. "last message 12 min ago" */
	note?: string | null;
}

// ---- accounts ----

export interface InvitationData {
	recipient: { name: string };
	/** the administrator's name */
	invitedBy: string;
	/** e.g. "Chief engineer" */
	roleLabel: string;
	/** the raw token (only ever in this e-mail); the link is ORIGIN/account/invite/{token} */
	token: string;
	expiresAt: number;
}

export interface PasswordResetData {
	recipient: { name: string };
	/** the raw token; the link is ORIGIN/account/reset/{token} */
	token: string;
	expiresAt: number;
	/** set when an administrator sent the link, not the user */
	requestedBy?: string | null;
}

// ---- alarms ----

/** First message of an alarm's thread, to the vessel's engineers. */
export interface AlarmRaisedData {
	recipient: MailRecipient;
	alarm: AlarmFacts;
}

/** To fleet managers, when nobody acknowledged in time: says who was told and when. */
export interface AlarmEscalatedData {
	recipient: MailRecipient;
	alarm: AlarmFacts;
	escalatedAt: number;
	/** everyone already told about this alarm, with when */
	notified: { name: string; role?: string | null; at: number }[];
}

/** A later change, sent in the same thread (In-Reply-To the first message). */
export interface AlarmFollowupData {
	recipient: MailRecipient;
	/** the alarm as it is now (measured = the latest reading) */
	alarm: AlarmFacts;
	change: 'acknowledged' | 'returned_to_normal';
	at: number;
	/** who acknowledged; null for a return to normal */
	by?: string | null;
	comment?: string | null;
	/** acknowledged after the condition had already cleared (ISA-18.2: returned to normal, unacknowledged) */
	alreadyCleared?: boolean;
}

/** Many alarms raised within a short window, told in one message instead of a storm. */
export interface AlarmFloodData {
	recipient: MailRecipient;
	alarms: AlarmFacts[];
	/** the window the alarms were raised in */
	from: number;
	to: number;
	/** a later message of the same thread: every alert listed is now acknowledged, or back to normal */
	followup?: { change: 'acknowledged' | 'returned_to_normal'; at: number } | null;
}

export interface DigestAlarm {
	alarmId: number;
	priority: MailPriority;
	condition: AlarmCondition;
	shaft: MailShaft | null;
	raisedAt: number;
	/** null: still active at the end of the period */
	clearedAt: number | null;
	acknowledgedBy: string | null;
	acknowledgedAt: number | null;
}

export interface DigestShaft {
	shaft: MailShaft;
	/** the shaft's minimum flow (L/min) */
	minFlowLpm: number;
	/** time with flow below the minimum in the period (ms) */
	belowMinimumMs: number;
	/** time without data in the period (ms): unknown, not compliant */
	unknownMs: number;
	lowestFlowLpm: number | null;
}

export interface DigestVessel {
	vessel: MailVessel;
	alarms: DigestAlarm[];
	shafts: DigestShaft[];
	purges: { done: number; missed: number; missedAt: number[] };
}

export interface DailyDigestData {
	recipient: MailRecipient;
	/** the 24 h (or so) the digest covers */
	period: { from: number; to: number };
	/** the recipient's zone (user_preferences.time_zone): the period is told in it */
	timeZone: string;
	vessels: DigestVessel[];
}

// ---- the union every caller renders through ----

export type MailRequest =
	| { kind: 'invitation'; data: InvitationData }
	| { kind: 'password_reset'; data: PasswordResetData }
	| { kind: 'alarm_raised'; data: AlarmRaisedData }
	| { kind: 'alarm_escalated'; data: AlarmEscalatedData }
	| { kind: 'alarm_followup'; data: AlarmFollowupData }
	| { kind: 'alarm_flood'; data: AlarmFloodData }
	| { kind: 'daily_digest'; data: DailyDigestData };

export type MailKind = MailRequest['kind'];

export interface RenderedMail {
	subject: string;
	text: string;
	html: string;
}

/** What every template needs from the running app. */
export interface MailEnv {
	/** ORIGIN, without a trailing slash: every link starts with it */
	origin: string;
}
