/**
 * The demo timetable: a 15-minute cycle that walks through the fault
 * scenarios on different demo vessels, so that a visitor sees a real alarm
 * within the first two minutes and every kind of trouble within one cycle.
 * The vessels in a scenario are held at sea, where their alarms are live
 * (alarms that need a turning shaft are suppressed in port).
 */
import type { Fault } from './faults';
import type { VoyageMode } from './voyage';

export type TimetableEntry =
	| { atS: number; vessel: string; fault: Fault; on: boolean; shaft?: string; why: string }
	| { atS: number; vessel: string; voyage: VoyageMode | null; why: string };

/** One cycle, s */
export const DEMO_CYCLE_S = 900;

export const DEMO_TIMETABLE: readonly TimetableEntry[] = [
	{ atS: 0, vessel: 'corrin-bay', voyage: 'steaming', why: 'keep the pump-trip shaft turning' },
	{ atS: 0, vessel: 'hallow-tern', voyage: 'steaming', why: 'at sea while its separator clogs' },
	{
		atS: 0,
		vessel: 'skerry-lark',
		voyage: 'steaming',
		why: 'at sea for the sensor and link faults'
	},
	// Low flow within ~1.5 s of the trip, alarmed after the on-delay; the standby pump
	// starts 45 s later (its default delay) and the alarm returns to normal.
	{
		atS: 60,
		vessel: 'corrin-bay',
		shaft: 'port',
		fault: 'pump-trip',
		on: true,
		why: 'duty pump trips'
	},
	{
		atS: 90,
		vessel: 'hallow-tern',
		fault: 'clogging',
		on: true,
		why: 'silt-laden water: ΔP climbs ~0.2 bar/min'
	},
	{
		atS: 120,
		vessel: 'lakeline-wren',
		fault: 'stuck-valve',
		on: true,
		why: 'purges are missed until freed'
	},
	{
		atS: 150,
		vessel: 'corrin-bay',
		shaft: 'port',
		fault: 'pump-trip',
		on: false,
		why: 'crew resets the duty pump'
	},
	{
		atS: 200,
		vessel: 'skerry-lark',
		shaft: 'stbd',
		fault: 'dead-sensor',
		on: true,
		why: 'flow reading freezes'
	},
	{
		atS: 330,
		vessel: 'skerry-lark',
		shaft: 'stbd',
		fault: 'dead-sensor',
		on: false,
		why: 'sensor replaced'
	},
	{
		atS: 360,
		vessel: 'skerry-lark',
		fault: 'offline',
		on: true,
		why: 'satellite link drops for 60 s'
	},
	{
		atS: 420,
		vessel: 'hallow-tern',
		fault: 'clogging',
		on: false,
		why: 'back in clean water; ΔP stays until purged'
	},
	{ atS: 480, vessel: 'hallow-tern', voyage: null, why: 'free to follow its own voyage' },
	{ atS: 480, vessel: 'skerry-lark', voyage: null, why: 'free to follow its own voyage' },
	{
		atS: 480,
		vessel: 'corrin-bay',
		shaft: 'stbd',
		fault: 'drifting-sensor',
		on: true,
		why: 'flow meter drifts'
	},
	{
		atS: 600,
		vessel: 'corrin-bay',
		fault: 'valve-stuck-open',
		on: true,
		why: 'next purge leaves the valve open'
	},
	{ atS: 720, vessel: 'lakeline-wren', fault: 'stuck-valve', on: false, why: 'valve freed' },
	{ atS: 750, vessel: 'lakeline-wren', voyage: 'port', why: 'calls at port: shafts stop' },
	{
		atS: 780,
		vessel: 'corrin-bay',
		shaft: 'stbd',
		fault: 'drifting-sensor',
		on: false,
		why: 'meter recalibrated'
	},
	{ atS: 840, vessel: 'corrin-bay', fault: 'valve-stuck-open', on: false, why: 'valve freed' },
	{ atS: 870, vessel: 'lakeline-wren', voyage: null, why: 'leaves port in its own time' },
	{ atS: 880, vessel: 'corrin-bay', voyage: null, why: 'free until the next cycle' }
];

/**
 * The entries due in the interval (fromS, toS] of run time, across cycles, in
 * time order. Entries at 0 s are due at the start (fromS < 0).
 */
export function dueEntries(
	entries: readonly TimetableEntry[],
	fromS: number,
	toS: number,
	cycleS = DEMO_CYCLE_S
): TimetableEntry[] {
	const due: { t: number; entry: TimetableEntry }[] = [];
	for (let k = Math.max(0, Math.floor(fromS / cycleS)); k <= Math.floor(toS / cycleS); k++) {
		for (const entry of entries) {
			const t = k * cycleS + entry.atS;
			if (t > fromS && t <= toS) due.push({ t, entry });
		}
	}
	return due.sort((a, b) => a.t - b.t).map((d) => d.entry);
}

export interface TimetableTarget {
	hasVessel(code: string, shaft?: string): boolean;
	setFault(vessel: string, fault: Fault, on: boolean, shaft?: string): void;
	pinVoyage(vessel: string, mode: VoyageMode | null): void;
}

/** Plays the timetable against a running simulator; returns a function that stops it. */
export function startTimetable(
	target: TimetableTarget,
	log: (line: string) => void,
	entries: readonly TimetableEntry[] = DEMO_TIMETABLE,
	cycleS = DEMO_CYCLE_S
): () => void {
	const started = Date.now();
	let playedTo = -1;
	const play = () => {
		const now = (Date.now() - started) / 1000;
		for (const entry of dueEntries(entries, playedTo, now, cycleS)) {
			const shaft = 'shaft' in entry ? entry.shaft : undefined;
			if (!target.hasVessel(entry.vessel, shaft)) continue;
			if ('fault' in entry) {
				target.setFault(entry.vessel, entry.fault, entry.on, shaft);
				const where = `${entry.vessel}${shaft ? `/${shaft}` : ''}`;
				log(`timetable: ${entry.fault} ${entry.on ? 'on' : 'off'} at ${where} (${entry.why})`);
			} else {
				target.pinVoyage(entry.vessel, entry.voyage);
			}
		}
		playedTo = now;
	};
	play();
	const timer = setInterval(play, 500);
	return () => clearInterval(timer);
}
