import { describe, expect, it } from 'vitest';
import {
	overlap,
	summariseAlarms,
	summarisePurges,
	unionLength,
	type AlarmInstance
} from './alarm-time';

const T = Date.UTC(2026, 2, 1, 12, 0, 0);
const min = (m: number) => T + m * 60_000;

describe('unionLength', () => {
	it('merges overlapping and touching intervals', () => {
		// [0,10) ∪ [5,15) ∪ [15,20) ∪ [30,40) = [0,20) + [30,40) = 30
		expect(
			unionLength([
				[30, 40],
				[0, 10],
				[5, 15],
				[15, 20]
			])
		).toBe(30);
		expect(unionLength([])).toBe(0);
		expect(unionLength([[5, 5]])).toBe(0);
	});
});

describe('summariseAlarms (hand-worked)', () => {
	// the period: 12:00–13:00
	const from = min(0);
	const to = min(60);
	const now = min(90);

	it('a period that starts inside an alarm counts its time from the start, not the alarm', () => {
		const alarms: AlarmInstance[] = [
			// raised 11:50, ended 12:20 → 20 min inside the period; raised before it, so not counted
			{ type: 'low_flow', priority: 'alarm', raised_at: min(-10), ended_at: min(20) }
		];
		const s = summariseAlarms(alarms, from, to, now);
		expect(s.count).toBe(0);
		expect(s.active_at_start).toBe(1);
		expect(s.by_type.low_flow).toEqual({ count: 0, seconds: 20 * 60 });
		expect(s.by_priority.alarm.seconds).toBe(1200);
		expect(s.seconds_in_any).toBe(1200);
	});

	it('an alarm still open runs to the end of the period, or to now if sooner', () => {
		// raised 12:40, still open: 12:40–13:00 = 20 min inside the period
		const open: AlarmInstance = {
			type: 'stale_data',
			priority: 'warning',
			raised_at: min(40),
			ended_at: null
		};
		expect(summariseAlarms([open], from, to, now).by_type.stale_data).toEqual({
			count: 1,
			seconds: 1200
		});
		// with now = 12:45 the open alarm has lasted 5 min so far
		expect(summariseAlarms([open], from, to, min(45)).by_type.stale_data.seconds).toBe(300);
	});

	it('counts by type and priority, and time in any alarm is the union', () => {
		const alarms: AlarmInstance[] = [
			{ type: 'low_flow', priority: 'alarm', raised_at: min(10), ended_at: min(15) }, // 5 min
			{ type: 'low_flow', priority: 'alarm', raised_at: min(30), ended_at: min(32) }, // 2 min
			{ type: 'low_flow_margin', priority: 'warning', raised_at: min(8), ended_at: min(12) }, // 4 min, overlaps 10–12
			{ type: 'sensor_fault', priority: 'caution', raised_at: min(70), ended_at: min(75) }, // after the period
			{ type: 'low_flow', priority: 'alarm', raised_at: min(-30), ended_at: min(-20) } // before it
		];
		const s = summariseAlarms(alarms, from, to, now);
		expect(s.count).toBe(3);
		expect(s.active_at_start).toBe(0);
		expect(s.by_type.low_flow).toEqual({ count: 2, seconds: 7 * 60 });
		expect(s.by_type.low_flow_margin).toEqual({ count: 1, seconds: 4 * 60 });
		expect(s.by_type.sensor_fault).toEqual({ count: 0, seconds: 0 });
		expect(s.by_priority.alarm).toEqual({ count: 2, seconds: 420 });
		expect(s.by_priority.warning).toEqual({ count: 1, seconds: 240 });
		// union: 12:08–12:15 (7 min) + 12:30–12:32 (2 min) = 9 min
		expect(s.seconds_in_any).toBe(9 * 60);
	});

	it('overlap clips to the period', () => {
		const a: AlarmInstance = {
			type: 'low_flow',
			priority: 'alarm',
			raised_at: min(-5),
			ended_at: min(65)
		};
		expect(overlap(a, from, to, now)).toEqual([from, to]);
		expect(overlap({ ...a, ended_at: min(-1) }, from, to, now)).toBeNull();
	});
});

describe('summarisePurges', () => {
	it('counts by source and outcome', () => {
		const s = summarisePurges([
			{ source: 'schedule', outcome: 'done' },
			{ source: 'schedule', outcome: 'done' },
			{ source: 'schedule', outcome: 'missed' },
			{ source: 'manual', outcome: 'valve_stuck_open' },
			{ source: 'schedule', outcome: 'pending' }
		]);
		expect(s).toEqual({
			total: 5,
			scheduled: 4,
			manual: 1,
			done: 2,
			missed: 1,
			valve_stuck_open: 1,
			pending: 1
		});
	});
});
