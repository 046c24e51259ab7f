import { describe, expect, it } from 'vitest';
import {
	ALARM_EVENT_TYPES,
	ALARM_STATES,
	alarmState,
	isActiveInstance,
	MAX_SHELVE_S,
	needsAcknowledge,
	NORMAL_STATUS,
	reduce,
	shelvingExpired,
	validateShelve,
	type AlarmEvent,
	type AlarmEventType,
	type AlarmState,
	type AlarmStatus
} from './state-machine';

const T = Date.UTC(2026, 0, 15, 8, 0, 0);
const HOUR = 3_600_000;

const status = (p: Partial<AlarmStatus>): AlarmStatus => ({ ...NORMAL_STATUS, ...p });
const base = {
	normal: status({}),
	unacknowledged: status({ active: true, acknowledged: false }),
	acknowledged: status({ active: true, acknowledged: true }),
	returned_unacknowledged: status({ active: false, acknowledged: false })
};
/** One underlying status per displayed state; the hidden ones over different base states. */
const FROM: Record<AlarmState, AlarmStatus> = {
	...base,
	shelved: { ...base.unacknowledged, shelved_until: T + HOUR },
	suppressed: { ...base.acknowledged, suppressed: true },
	out_of_service: { ...base.normal, out_of_service: true }
};

function event(type: AlarmEventType, from: AlarmStatus): AlarmEvent {
	if (type === 'shelve') return { type, at: T, until: T + 2 * HOUR };
	// the timer fires at the end of the shelving, or at T when there is none
	if (type === 'shelve_expired') return { type, at: from.shelved_until ?? T };
	return { type, at: T };
}

type Expect = AlarmState | { error: RegExp };
const E = {
	nothing: { error: /nothing to acknowledge/ },
	notShelved: { error: /not shelved/ },
	shelved: { error: /is shelved/ },
	suppressed: { error: /suppressed/ },
	oos: { error: /out of service/ }
};

/**
 * Every event from every state. Base transitions: ANSI/ISA-18.2 state diagram
 * [memory]; acknowledge, active, shelving and suppression as defined in OPC UA
 * Part 9 (OPC 10000-9): hidden alarms go on tracking their condition.
 * Columns: [from, event, expected state or error, status changed].
 */
const TABLE: [AlarmState, AlarmEventType, Expect, boolean][] = [
	['normal', 'activate', 'unacknowledged', true],
	['normal', 'clear', 'normal', false],
	['normal', 'acknowledge', E.nothing, false],
	['normal', 'shelve', 'shelved', true],
	['normal', 'unshelve', E.notShelved, false],
	['normal', 'shelve_expired', E.notShelved, false],
	['normal', 'suppress', 'suppressed', true],
	['normal', 'unsuppress', 'normal', false],
	['normal', 'remove_from_service', 'out_of_service', true],
	['normal', 'return_to_service', 'normal', false],

	['unacknowledged', 'activate', 'unacknowledged', false],
	['unacknowledged', 'clear', 'returned_unacknowledged', true],
	['unacknowledged', 'acknowledge', 'acknowledged', true],
	['unacknowledged', 'shelve', 'shelved', true],
	['unacknowledged', 'unshelve', E.notShelved, false],
	['unacknowledged', 'shelve_expired', E.notShelved, false],
	['unacknowledged', 'suppress', 'suppressed', true],
	['unacknowledged', 'unsuppress', 'unacknowledged', false],
	['unacknowledged', 'remove_from_service', 'out_of_service', true],
	['unacknowledged', 'return_to_service', 'unacknowledged', false],

	['acknowledged', 'activate', 'acknowledged', false],
	['acknowledged', 'clear', 'normal', true],
	['acknowledged', 'acknowledge', E.nothing, false],
	['acknowledged', 'shelve', 'shelved', true],
	['acknowledged', 'unshelve', E.notShelved, false],
	['acknowledged', 'shelve_expired', E.notShelved, false],
	['acknowledged', 'suppress', 'suppressed', true],
	['acknowledged', 'unsuppress', 'acknowledged', false],
	['acknowledged', 'remove_from_service', 'out_of_service', true],
	['acknowledged', 'return_to_service', 'acknowledged', false],

	['returned_unacknowledged', 'activate', 'unacknowledged', true],
	['returned_unacknowledged', 'clear', 'returned_unacknowledged', false],
	['returned_unacknowledged', 'acknowledge', 'normal', true],
	['returned_unacknowledged', 'shelve', 'shelved', true],
	['returned_unacknowledged', 'unshelve', E.notShelved, false],
	['returned_unacknowledged', 'shelve_expired', E.notShelved, false],
	['returned_unacknowledged', 'suppress', 'suppressed', true],
	['returned_unacknowledged', 'unsuppress', 'returned_unacknowledged', false],
	['returned_unacknowledged', 'remove_from_service', 'out_of_service', true],
	['returned_unacknowledged', 'return_to_service', 'returned_unacknowledged', false],

	// shelved over unacknowledged
	['shelved', 'activate', 'shelved', false],
	['shelved', 'clear', 'shelved', true],
	['shelved', 'acknowledge', E.shelved, false],
	['shelved', 'shelve', E.shelved, false],
	['shelved', 'unshelve', 'unacknowledged', true],
	['shelved', 'shelve_expired', 'unacknowledged', true],
	['shelved', 'suppress', 'suppressed', true],
	['shelved', 'unsuppress', 'shelved', false],
	['shelved', 'remove_from_service', 'out_of_service', true],
	['shelved', 'return_to_service', 'shelved', false],

	// suppressed over acknowledged
	['suppressed', 'activate', 'suppressed', false],
	['suppressed', 'clear', 'suppressed', true],
	['suppressed', 'acknowledge', E.suppressed, false],
	['suppressed', 'shelve', E.suppressed, false],
	['suppressed', 'unshelve', E.notShelved, false],
	['suppressed', 'shelve_expired', E.notShelved, false],
	['suppressed', 'suppress', 'suppressed', false],
	['suppressed', 'unsuppress', 'acknowledged', true],
	['suppressed', 'remove_from_service', 'out_of_service', true],
	['suppressed', 'return_to_service', 'suppressed', false],

	// out of service over normal
	['out_of_service', 'activate', 'out_of_service', true],
	['out_of_service', 'clear', 'out_of_service', false],
	['out_of_service', 'acknowledge', E.oos, false],
	['out_of_service', 'shelve', E.oos, false],
	['out_of_service', 'unshelve', E.notShelved, false],
	['out_of_service', 'shelve_expired', E.notShelved, false],
	['out_of_service', 'suppress', 'out_of_service', true],
	['out_of_service', 'unsuppress', 'out_of_service', false],
	['out_of_service', 'remove_from_service', 'out_of_service', false],
	['out_of_service', 'return_to_service', 'normal', true]
];

describe('every event from every state (ANSI/ISA-18.2 state diagram [memory]; OPC 10000-9)', () => {
	it('the table covers each of the 7 states × 10 events once', () => {
		const keys = new Set(TABLE.map(([s, e]) => `${s}/${e}`));
		expect(keys.size).toBe(TABLE.length);
		expect(TABLE.length).toBe(ALARM_STATES.length * ALARM_EVENT_TYPES.length);
		for (const s of ALARM_STATES) expect(alarmState(FROM[s])).toBe(s);
	});

	it.each(TABLE)('%s + %s → %o (changed: %s)', (from, type, expected, changed) => {
		const before = structuredClone(FROM[from]);
		const result = reduce(FROM[from], event(type, FROM[from]));
		expect(FROM[from]).toEqual(before); // pure: the input is never mutated
		if (typeof expected === 'object') {
			expect(result).toEqual({ error: expect.stringMatching(expected.error) });
			return;
		}
		if ('error' in result) throw new Error(`unexpected error: ${result.error}`);
		expect(result.from).toBe(from);
		expect(result.to).toBe(expected);
		expect(alarmState(result.status)).toBe(expected);
		expect(result.changed).toBe(changed);
	});
});

function run(start: AlarmStatus, events: AlarmEvent[]): AlarmStatus {
	return events.reduce((s, e) => {
		const r = reduce(s, e);
		if ('error' in r) throw new Error(`${e.type}: ${r.error}`);
		return r.status;
	}, start);
}

describe('hidden alarms keep tracking their condition', () => {
	it('a clear after acknowledge, then a new activation, needs acknowledging again', () => {
		// ISA-18.2 [memory]: each activation from normal is a new alarm
		const s = run(NORMAL_STATUS, [
			{ type: 'activate', at: T },
			{ type: 'acknowledge', at: T + 1 },
			{ type: 'clear', at: T + 2 },
			{ type: 'activate', at: T + 3 }
		]);
		expect(alarmState(s)).toBe('unacknowledged');
	});

	it('shelved: what happened meanwhile shows at expiry, still to acknowledge', () => {
		// ISA-18.2: shelved alarms return automatically at expiry; OPC 10000-9 keeps
		// AckedState apart from ShelvingState
		const cleared = run(FROM.acknowledged, [
			{ type: 'shelve', at: T, until: T + HOUR },
			{ type: 'clear', at: T + 10 },
			{ type: 'activate', at: T + 20 },
			{ type: 'clear', at: T + 30 },
			{ type: 'shelve_expired', at: T + HOUR }
		]);
		expect(alarmState(cleared)).toBe('returned_unacknowledged');
		const stillActive = run(FROM.acknowledged, [
			{ type: 'shelve', at: T, until: T + HOUR },
			{ type: 'shelve_expired', at: T + HOUR }
		]);
		expect(alarmState(stillActive)).toBe('acknowledged');
	});

	it('suppressed or out of service: a clear meanwhile leaves nothing to acknowledge', () => {
		for (const hide of ['suppress', 'remove_from_service'] as const) {
			const show = hide === 'suppress' ? 'unsuppress' : 'return_to_service';
			const s = run(FROM.unacknowledged, [
				{ type: hide, at: T },
				{ type: 'clear', at: T + 10 },
				{ type: show, at: T + 20 }
			]);
			expect(alarmState(s)).toBe('normal');
			expect(isActiveInstance(s)).toBe(false);
		}
	});

	it('out of service: an activation still standing at return is annunciated as new', () => {
		const s = run(NORMAL_STATUS, [
			{ type: 'remove_from_service', at: T },
			{ type: 'activate', at: T + 10 },
			{ type: 'return_to_service', at: T + 20 }
		]);
		expect(alarmState(s)).toBe('unacknowledged');
	});

	it('stacked: out of service over suppressed over shelved unwinds in that order', () => {
		let s = run(FROM.unacknowledged, [
			{ type: 'shelve', at: T, until: T + HOUR },
			{ type: 'suppress', at: T + 1 },
			{ type: 'remove_from_service', at: T + 2 }
		]);
		expect(alarmState(s)).toBe('out_of_service');
		s = run(s, [{ type: 'return_to_service', at: T + 3 }]);
		expect(alarmState(s)).toBe('suppressed');
		s = run(s, [{ type: 'unsuppress', at: T + 4 }]);
		expect(alarmState(s)).toBe('shelved');
		s = run(s, [{ type: 'unshelve', at: T + 5 }]);
		expect(alarmState(s)).toBe('unacknowledged');
	});
});

describe('shelving limits', () => {
	it('needs an end in the future', () => {
		expect(reduce(FROM.unacknowledged, { type: 'shelve', at: T, until: T })).toEqual({
			error: expect.stringMatching(/future/)
		});
		expect(reduce(FROM.unacknowledged, { type: 'shelve', at: T, until: T - 1 })).toHaveProperty(
			'error'
		);
	});

	it('expiry before the end is refused', () => {
		expect(reduce(FROM.shelved, { type: 'shelve_expired', at: T + HOUR - 1 })).toEqual({
			error: expect.stringMatching(/not expired/)
		});
		expect(shelvingExpired(FROM.shelved, T + HOUR - 1)).toBe(false);
		expect(shelvingExpired(FROM.shelved, T + HOUR)).toBe(true);
		expect(shelvingExpired(FROM.normal, T)).toBe(false);
	});

	it('is at most 8 hours (common practice; OPC 10000-9 MaxTimeShelved)', () => {
		expect(MAX_SHELVE_S).toBe(8 * 3600);
		expect(validateShelve(T, T + 8 * HOUR)).toBeNull();
		expect(validateShelve(T, T + 8 * HOUR + 1)).toMatch(/8 hours/);
		expect(validateShelve(T, T)).toMatch(/future/);
		expect(validateShelve(T, Number.NaN)).toMatch(/end time/);
	});

	it('refuses an event without a valid time', () => {
		expect(reduce(NORMAL_STATUS, { type: 'activate', at: Number.NaN })).toHaveProperty('error');
	});
});

describe('helpers', () => {
	it('needsAcknowledge only in the two unacknowledged states', () => {
		const needing = ALARM_STATES.filter(needsAcknowledge);
		expect(needing).toEqual(['unacknowledged', 'returned_unacknowledged']);
	});

	it('an instance is open from raise to return to normal, hidden or not', () => {
		expect(isActiveInstance(FROM.normal)).toBe(false);
		expect(isActiveInstance(FROM.unacknowledged)).toBe(true);
		expect(isActiveInstance(FROM.acknowledged)).toBe(true);
		expect(isActiveInstance(FROM.returned_unacknowledged)).toBe(true);
		expect(isActiveInstance(FROM.shelved)).toBe(true);
		expect(isActiveInstance(FROM.out_of_service)).toBe(false);
	});
});
