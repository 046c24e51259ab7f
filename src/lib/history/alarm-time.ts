/**
 * Alarms and purges over a period. An alarm instance lasts from raised_at
 * until it returned to normal (ended_at), or until now while it is still
 * open; its time in the period is the overlap of that with the period. Time
 * per type (and per priority) is the union of its instances, so two
 * overlapping instances are not counted twice. Counts are of instances
 * raised inside the period; an instance already active when the period
 * starts adds its time but is counted as `active_at_start`.
 */
import { ALARM_TYPES, PRIORITIES, type AlarmType, type Priority } from '../alarms/types';

export interface AlarmInstance {
	type: AlarmType;
	priority: Priority;
	raised_at: number;
	ended_at: number | null;
}

export interface CountAndTime {
	count: number;
	seconds: number;
}

export interface AlarmSummary {
	/** instances raised in the period */
	count: number;
	/** instances raised before the period and still active at its start */
	active_at_start: number;
	by_type: Record<AlarmType, CountAndTime>;
	by_priority: Record<Priority, CountAndTime>;
	/** time with at least one alarm of any type active */
	seconds_in_any: number;
}

/** Total length of the union of [a, b) intervals. */
export function unionLength(intervals: [number, number][]): number {
	const sorted = intervals.filter(([a, b]) => b > a).sort((x, y) => x[0] - y[0]);
	let total = 0;
	let start = -Infinity;
	let end = -Infinity;
	for (const [a, b] of sorted) {
		if (a > end) {
			if (end > start) total += end - start;
			start = a;
			end = b;
		} else if (b > end) {
			end = b;
		}
	}
	if (end > start) total += end - start;
	return total;
}

/** The part of an instance inside [from, to), or null. */
export function overlap(
	a: AlarmInstance,
	from: number,
	to: number,
	now: number
): [number, number] | null {
	const start = Math.max(a.raised_at, from);
	const end = Math.min(a.ended_at ?? Math.max(now, a.raised_at), to);
	return end > start ? [start, end] : null;
}

const zeroes = <K extends string>(keys: readonly K[]) =>
	Object.fromEntries(keys.map((k) => [k, { count: 0, seconds: 0 }])) as Record<K, CountAndTime>;

export function summariseAlarms(
	alarms: AlarmInstance[],
	from: number,
	to: number,
	now: number
): AlarmSummary {
	const byType = zeroes(ALARM_TYPES);
	const byPriority = zeroes(PRIORITIES);
	const typeSpans = new Map<AlarmType, [number, number][]>();
	const prioritySpans = new Map<Priority, [number, number][]>();
	const all: [number, number][] = [];
	let count = 0;
	let activeAtStart = 0;
	for (const a of alarms) {
		const span = overlap(a, from, to, now);
		if (a.raised_at >= from && a.raised_at < to) {
			count++;
			byType[a.type].count++;
			byPriority[a.priority].count++;
		} else if (a.raised_at < from && span && span[0] === from) {
			activeAtStart++;
		}
		if (!span) continue;
		all.push(span);
		(typeSpans.get(a.type) ?? typeSpans.set(a.type, []).get(a.type)!).push(span);
		(prioritySpans.get(a.priority) ?? prioritySpans.set(a.priority, []).get(a.priority)!).push(
			span
		);
	}
	for (const [type, spans] of typeSpans) byType[type].seconds = unionLength(spans) / 1000;
	for (const [p, spans] of prioritySpans) byPriority[p].seconds = unionLength(spans) / 1000;
	return {
		count,
		active_at_start: activeAtStart,
		by_type: byType,
		by_priority: byPriority,
		seconds_in_any: unionLength(all) / 1000
	};
}

export type PurgeOutcome = 'pending' | 'done' | 'missed' | 'valve_stuck_open';

export interface PurgeRecord {
	source: 'schedule' | 'manual';
	outcome: PurgeOutcome;
}

export interface PurgeSummary {
	total: number;
	/** commands the schedule sent */
	scheduled: number;
	/** commands someone sent by hand ("purge now") */
	manual: number;
	done: number;
	missed: number;
	valve_stuck_open: number;
	/** not yet judged (the valve may still be open) */
	pending: number;
}

export function summarisePurges(purges: PurgeRecord[]): PurgeSummary {
	const s: PurgeSummary = {
		total: 0,
		scheduled: 0,
		manual: 0,
		done: 0,
		missed: 0,
		valve_stuck_open: 0,
		pending: 0
	};
	for (const p of purges) {
		s.total++;
		s[p.source === 'schedule' ? 'scheduled' : 'manual']++;
		s[p.outcome]++;
	}
	return s;
}
