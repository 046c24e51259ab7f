import { describe, expect, it } from 'vitest';
import { demoFleet } from './fleet';
import { DEMO_CYCLE_S, DEMO_TIMETABLE, dueEntries } from './timetable';

describe('demo timetable', () => {
	it('trips the corrin-bay port pump within the first two minutes, with the shaft held at sea', () => {
		const first = dueEntries(DEMO_TIMETABLE, -1, 120);
		const trip = first.find((e) => 'fault' in e && e.fault === 'pump-trip' && e.on);
		expect(trip).toMatchObject({ vessel: 'corrin-bay', shaft: 'port', atS: 60 });
		expect(first.findIndex((e) => 'voyage' in e && e.vessel === 'corrin-bay')).toBeLessThan(
			first.indexOf(trip!)
		);
	});

	it('names only demo vessels and shafts, and turns off every fault it turns on within the cycle', () => {
		const fleet = demoFleet();
		const on = new Map<string, number>();
		for (const entry of [...DEMO_TIMETABLE].sort((a, b) => a.atS - b.atS)) {
			const vessel = fleet.find((v) => v.code === entry.vessel);
			expect(vessel, entry.vessel).toBeDefined();
			if ('shaft' in entry && entry.shaft)
				expect(vessel!.shafts.map((s) => s.code)).toContain(entry.shaft);
			expect(entry.atS).toBeGreaterThanOrEqual(0);
			expect(entry.atS).toBeLessThan(DEMO_CYCLE_S);
			if ('fault' in entry && entry.fault !== 'offline') {
				const key = `${entry.fault}:${entry.vessel}/${'shaft' in entry ? entry.shaft : ''}`;
				on.set(key, (on.get(key) ?? 0) + (entry.on ? 1 : -1));
			}
		}
		expect([...on.values()].every((n) => n === 0)).toBe(true);
	});

	it('plays each entry once per cycle, in time order, across the cycle boundary', () => {
		const entries = [
			{ atS: 0, vessel: 'a', voyage: null, why: '' },
			{ atS: 5, vessel: 'b', voyage: null, why: '' },
			{ atS: 8, vessel: 'c', voyage: null, why: '' }
		];
		const names = (from: number, to: number) =>
			dueEntries(entries, from, to, 10).map((e) => e.vessel);
		expect(names(-1, 4)).toEqual(['a']);
		expect(names(4, 9)).toEqual(['b', 'c']);
		expect(names(9, 16)).toEqual(['a', 'b']);
		expect(names(-1, 30)).toEqual(['a', 'b', 'c', 'a', 'b', 'c', 'a', 'b', 'c', 'a']);
		expect(names(5, 5)).toEqual([]);
	});
});
