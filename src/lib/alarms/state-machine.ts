/**
 * The alarm state model of ANSI/ISA-18.2 (IEC 62682) as a pure reducer.
 *
 * The status underneath is what OPC UA Part 9 (OPC 10000-9) keeps as separate
 * variables: active (the condition exists), acknowledged, and the three ways an
 * alarm is taken from view (shelving by an operator, suppression by design, out
 * of service). The displayed state is derived from it, so the two cannot
 * disagree. Transitions of the base states follow the ISA-18.2 state diagram
 * [memory]: normal → unacknowledged on activation; acknowledge; clear while
 * unacknowledged → returned to normal unacknowledged; clear while acknowledged
 * → normal; acknowledge a returned alarm → normal. Latching is not used.
 *
 * While an alarm is hidden, its status keeps tracking activate/clear, so when it
 * comes back (shelving expiry, unsuppress, return to service) it shows the state
 * it would be in. One difference by purpose: a clear while suppressed or out of
 * service also settles the acknowledgement, because the alarm did not apply
 * then and there is nothing for the operator to acknowledge (else every port
 * call would leave low-flow alarms to acknowledge). A clear while shelved does
 * not: the operator chose to look away, and what happened meanwhile is theirs.
 */

export const ALARM_STATES = [
	'normal',
	'unacknowledged',
	'acknowledged',
	'returned_unacknowledged',
	'shelved',
	'suppressed',
	'out_of_service'
] as const;
export type AlarmState = (typeof ALARM_STATES)[number];

export const ALARM_STATE_LABELS: Record<AlarmState, string> = {
	normal: 'Normal',
	unacknowledged: 'Unacknowledged',
	acknowledged: 'Acknowledged',
	returned_unacknowledged: 'Returned, unacknowledged',
	shelved: 'Shelved',
	suppressed: 'Suppressed by design',
	out_of_service: 'Out of service'
};

/** Times are epoch ms. */
export interface AlarmStatus {
	active: boolean;
	acknowledged: boolean;
	shelved_until: number | null;
	suppressed: boolean;
	out_of_service: boolean;
}

export const NORMAL_STATUS: Readonly<AlarmStatus> = Object.freeze({
	active: false,
	acknowledged: true,
	shelved_until: null,
	suppressed: false,
	out_of_service: false
});

export type AlarmEvent =
	| { type: 'activate'; at: number }
	| { type: 'clear'; at: number }
	| { type: 'acknowledge'; at: number }
	| { type: 'shelve'; at: number; until: number }
	| { type: 'unshelve'; at: number }
	| { type: 'shelve_expired'; at: number }
	| { type: 'suppress'; at: number }
	| { type: 'unsuppress'; at: number }
	| { type: 'remove_from_service'; at: number }
	| { type: 'return_to_service'; at: number };
export type AlarmEventType = AlarmEvent['type'];

export const ALARM_EVENT_TYPES: readonly AlarmEventType[] = [
	'activate',
	'clear',
	'acknowledge',
	'shelve',
	'unshelve',
	'shelve_expired',
	'suppress',
	'unsuppress',
	'remove_from_service',
	'return_to_service'
];

export type Transition =
	{ status: AlarmStatus; from: AlarmState; to: AlarmState; changed: boolean } | { error: string };

/** Longest shelving, 8 h: common practice (about one shift); OPC UA Part 9 calls it MaxTimeShelved. */
export const MAX_SHELVE_S = 8 * 3600;

/** The state shown: out of service over suppressed over shelved over the base states. */
export function alarmState(s: AlarmStatus): AlarmState {
	if (s.out_of_service) return 'out_of_service';
	if (s.suppressed) return 'suppressed';
	if (s.shelved_until !== null) return 'shelved';
	return baseState(s);
}

/** The ISA-18.2 base state, ignoring whatever hides the alarm. */
export function baseState(s: AlarmStatus): AlarmState {
	if (s.active) return s.acknowledged ? 'acknowledged' : 'unacknowledged';
	return s.acknowledged ? 'normal' : 'returned_unacknowledged';
}

/** An alarm instance runs from its raise to its return to normal, hidden or not. */
export function isActiveInstance(s: AlarmStatus): boolean {
	return s.active || !s.acknowledged;
}

export function needsAcknowledge(state: AlarmState): boolean {
	return state === 'unacknowledged' || state === 'returned_unacknowledged';
}

/** For the timer that sends shelve_expired. */
export function shelvingExpired(s: AlarmStatus, nowMs: number): boolean {
	return s.shelved_until !== null && nowMs >= s.shelved_until;
}

/** The caller's check of a shelve request: null when acceptable, else why not. */
export function validateShelve(atMs: number, untilMs: number): string | null {
	if (!Number.isFinite(atMs) || !Number.isFinite(untilMs)) return 'shelving needs an end time';
	if (untilMs <= atMs) return 'shelving must end in the future';
	if (untilMs - atMs > MAX_SHELVE_S * 1000) {
		return `shelving is limited to ${MAX_SHELVE_S / 3600} hours`;
	}
	return null;
}

function hiddenReason(s: AlarmStatus): string | null {
	if (s.out_of_service) return 'the alarm is out of service';
	if (s.suppressed) return 'the alarm is suppressed by design';
	if (s.shelved_until !== null) return 'the alarm is shelved';
	return null;
}

/** Returns the next status, or why the event cannot apply. */
function next(s: AlarmStatus, e: AlarmEvent): AlarmStatus | string {
	switch (e.type) {
		case 'activate':
			// a new activation after clear is a new alarm, to be acknowledged again
			return s.active ? s : { ...s, active: true, acknowledged: false };
		case 'clear': {
			if (!s.active) return s;
			const settles = s.suppressed || s.out_of_service;
			return { ...s, active: false, acknowledged: settles ? true : s.acknowledged };
		}
		case 'acknowledge':
			return (
				hiddenReason(s) ??
				(s.acknowledged ? 'nothing to acknowledge' : { ...s, acknowledged: true })
			);
		case 'shelve': {
			const hidden = hiddenReason(s);
			if (hidden) return hidden;
			if (!Number.isFinite(e.until) || e.until <= e.at) return 'shelving must end in the future';
			return { ...s, shelved_until: e.until };
		}
		case 'unshelve':
			return s.shelved_until === null ? 'the alarm is not shelved' : { ...s, shelved_until: null };
		case 'shelve_expired':
			if (s.shelved_until === null) return 'the alarm is not shelved';
			if (e.at < s.shelved_until) return 'shelving has not expired yet';
			return { ...s, shelved_until: null };
		// System and mode actions repeat harmlessly (the engine re-asserts them per sample).
		case 'suppress':
			return s.suppressed ? s : { ...s, suppressed: true };
		case 'unsuppress':
			return s.suppressed ? { ...s, suppressed: false } : s;
		case 'remove_from_service':
			return s.out_of_service ? s : { ...s, out_of_service: true };
		case 'return_to_service':
			return s.out_of_service ? { ...s, out_of_service: false } : s;
	}
}

export function reduce(status: AlarmStatus, event: AlarmEvent): Transition {
	if (!Number.isFinite(event.at)) return { error: 'the event has no valid time' };
	const result = next(status, event);
	if (typeof result === 'string') return { error: result };
	const changed =
		result.active !== status.active ||
		result.acknowledged !== status.acknowledged ||
		result.shelved_until !== status.shelved_until ||
		result.suppressed !== status.suppressed ||
		result.out_of_service !== status.out_of_service;
	return {
		status: changed ? result : { ...status },
		from: alarmState(status),
		to: alarmState(result),
		changed
	};
}
