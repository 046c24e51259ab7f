/**
 * The numbers and pure rules of the notification policy: who is in which
 * audience, how a batch of alarms is told (one by one or as a flood summary),
 * what each alarm type reads as in an e-mail, and when a digest is due.
 * No I/O here, so policy.test.ts checks the rules without a database.
 */
import { DateTime } from 'luxon';
import type { AlarmType, Priority } from '$lib/alarms/types';
import { ONBOARD_ROLES, type Role } from '$lib/types';
import type { AlarmCondition, MeasuredAgainstLimit } from '../mail/templates/types';

/**
 * 5 s: every shown alarm's first e-mail waits this long for the rest of its
 * vessel's batch. Alarms that share a cause (a pump trip: low flow and low
 * supply pressure on each shaft; a gateway drop: stale data on every shaft)
 * pass their on-delays on the same samples and are raised within a second or
 * two of each other; 5 s adds little to the 15 s on-delay already waited.
 */
export const HOLD_MS = 5_000;

/** A batch of this many alarms or more is told as one flood summary instead of one e-mail each. */
export const FLOOD_BURST_MIN = 3;

/**
 * EEMUA 191 (as summarised in secondary sources) [memory-grade]: more than 10
 * alarms in 10 minutes per operator is a flood. A vessel's crew is the
 * operator here: past that rate, its alarms are gathered for FLOOD_HOLD_MS and
 * told as one summary, so a recipient gets at most about one message a minute.
 */
export const FLOOD_RATE_MAX = 10;
export const FLOOD_RATE_WINDOW_MS = 10 * 60_000;
/** 60 s: the batch window while a vessel is flooding. */
export const FLOOD_HOLD_MS = 60_000;

export const NOTIFY_DEFAULTS = {
	/** 300 s, the default: the crew's time to acknowledge before shore is told */
	escalation_after_s: 300,
	/**
	 * 600 s: a new alarm of the same shaft and type within 10 minutes of the last
	 * one's return to normal belongs to the same incident and sends nothing new;
	 * the "returned to normal" follow-up waits until the shaft has stayed normal
	 * this long, so it is never followed by a silent re-raise. 10 minutes is
	 * EEMUA 191's rate window [memory-grade]: a shaft that chatters faster than
	 * the flood benchmark stays one incident.
	 */
	incident_holdoff_s: 600
} as const;
export type NotifySettingsValues = { -readonly [K in keyof typeof NOTIFY_DEFAULTS]: number };

/** What the settings page and API show of the fixed numbers above. */
export const POLICY_FIGURES = {
	hold_s: HOLD_MS / 1000,
	flood_burst_min: FLOOD_BURST_MIN,
	flood_rate_max: FLOOD_RATE_MAX,
	flood_rate_window_s: FLOOD_RATE_WINDOW_MS / 1000,
	flood_hold_s: FLOOD_HOLD_MS / 1000
};

const PRIORITY_ORDER: readonly Priority[] = ['alarm', 'warning', 'caution'];

export function topPriority(priorities: Priority[]): Priority {
	return PRIORITY_ORDER.find((p) => priorities.includes(p)) ?? 'caution';
}

/** Raised alerts go to the vessel's crew (its members in on-board roles). */
export function inCrewAudience(role: Role): boolean {
	return ONBOARD_ROLES.includes(role);
}

/** Escalations go to the fleet managers, fleet-wide. */
export function inEscalationAudience(role: Role): boolean {
	return role === 'fleet_manager';
}

/**
 * How a batch is told. A burst of FLOOD_BURST_MIN or more is a flood; so is any
 * batch of two or more while the vessel is past the EEMUA rate (recentCount
 * counts the incidents shown on the vessel in the last FLOOD_RATE_WINDOW_MS,
 * this batch included). A single alarm is always told on its own.
 */
export function batchIsFlood(batchSize: number, recentCount: number): boolean {
	if (batchSize < 2) return false;
	return batchSize >= FLOOD_BURST_MIN || recentCount > FLOOD_RATE_MAX;
}

/** The window a newly shown alarm waits in when no batch of its vessel is open. */
export function holdFor(recentCountBefore: number): number {
	return recentCountBefore >= FLOOD_RATE_MAX ? FLOOD_HOLD_MS : HOLD_MS;
}

/**
 * Low-flow margin is the warning band above the minimum: while the same shaft
 * has a low-flow incident, the margin warning adds nothing and is not e-mailed.
 */
export function coveredBy(type: AlarmType): AlarmType | null {
	return type === 'low_flow_margin' ? 'low_flow' : null;
}

/** The mail templates' condition for each alarm type. */
export const CONDITION_OF: Record<AlarmType, AlarmCondition> = {
	low_flow: 'low_flow',
	low_flow_margin: 'low_flow_margin',
	low_supply_pressure: 'low_supply_pressure',
	separator_dp_high: 'separator_dp_high',
	purge_missed: 'purge_missed',
	purge_valve_stuck_open: 'purge_valve_stuck_open',
	stale_data: 'stale_data',
	water_temp_high: 'water_temp_high',
	sensor_fault: 'implausible_value'
};

/**
 * The reading an e-mail states against its limit, in SI (the template converts
 * to the recipient's units). Flow alarms are told against the shaft's minimum
 * flow, the figure that protects the bearing: for the margin warning that is
 * the minimum itself, not the warning threshold, which goes in the note.
 */
export function measuredFor(
	type: AlarmType,
	value: number | null,
	limit: number | null,
	shaftMinFlowLpm: number | null
): MeasuredAgainstLimit | null {
	switch (type) {
		case 'low_flow':
			return limitOr(limit ?? shaftMinFlowLpm, (l) => ({
				quantity: 'flow',
				valueSi: value,
				limitSi: l,
				limit: 'minimum'
			}));
		case 'low_flow_margin':
		case 'sensor_fault':
			return limitOr(shaftMinFlowLpm, (l) => ({
				quantity: 'flow',
				// a sensor fault has no reading to trust
				valueSi: type === 'sensor_fault' ? null : value,
				limitSi: l,
				limit: 'minimum'
			}));
		case 'low_supply_pressure':
			return limitOr(limit, (l) => ({
				quantity: 'pressure',
				valueSi: value,
				limitSi: l,
				limit: 'minimum'
			}));
		case 'separator_dp_high':
			return limitOr(limit, (l) => ({
				quantity: 'pressure',
				valueSi: value,
				limitSi: l,
				limit: 'maximum'
			}));
		case 'water_temp_high':
			return limitOr(limit, (l) => ({
				quantity: 'temperature',
				valueSi: value,
				limitSi: l,
				limit: 'maximum'
			}));
		default:
			// stale data (seconds), purges: no reading; the note says what there is
			return null;
	}
}

function limitOr(
	limit: number | null,
	make: (l: number) => MeasuredAgainstLimit
): MeasuredAgainstLimit | null {
	return limit === null || !Number.isFinite(limit) ? null : make(limit);
}

// ---- the daily digest ----

/** 1 h: a digest tick this late (a stalled process, a restart) still sends that day's digest. */
export const DIGEST_LATE_MS = 60 * 60_000;

export interface DigestSlot {
	/** the digest hour today in the zone, epoch ms (a time skipped by a clock change moves forward) */
	at: number;
	/** 'yyyy-MM-dd' in the zone: one digest per user and local date */
	localDate: string;
	/** the period covered: from the same hour the day before */
	from: number;
}

/**
 * The digest due at `now` for a user whose hour is `hour` in `zone`, or null.
 * Due from the hour until DIGEST_LATE_MS after it; the period is the local day
 * before (23 or 25 h across a clock change).
 */
export function digestSlot(zone: string, hour: number, now: number): DigestSlot | null {
	let local = DateTime.fromMillis(now, { zone });
	if (!local.isValid) local = DateTime.fromMillis(now, { zone: 'utc' });
	const slot = local.set({ hour, minute: 0, second: 0, millisecond: 0 });
	const at = slot.toMillis();
	if (now < at || now >= at + DIGEST_LATE_MS) return null;
	return {
		at,
		localDate: slot.toFormat('yyyy-MM-dd'),
		from: slot.minus({ days: 1 }).toMillis()
	};
}

/**
 * The zone a user's digest hour is read in: the ship's clock for a member of
 * exactly one vessel (an engineer on board lives by it, and it follows the ship
 * as its zone is changed); otherwise — several vessels, or the whole fleet
 * from ashore — the zone in the user's own notification settings.
 */
export function digestZone(
	memberVesselZones: string[],
	role: Role,
	preferenceZone: string
): string {
	if (inCrewAudience(role) && memberVesselZones.length === 1) return memberVesselZones[0];
	return preferenceZone;
}
