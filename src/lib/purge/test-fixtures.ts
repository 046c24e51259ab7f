/** Fixtures shared by the purge schedule's unit tests (not part of the app). */
import type { PurgeSchedule } from './input';

// Clock changes from the IANA tz database (EU rule: last Sunday of March/October at 01:00 UTC;
// US rule: second Sunday of March / first Sunday of November at 02:00 local).
export const OSLO = 'Europe/Oslo'; // 2026-03-29 01:00Z CET+1 → CEST+2; 2026-10-25 01:00Z back to CET
export const CHICAGO = 'America/Chicago'; // 2026-03-08 08:00Z CST−6 → CDT−5; 2026-11-01 07:00Z back
export const SINGAPORE = 'Asia/Singapore'; // +08:00 all year, no daylight saving

/** The expected times in the tests assume these: every 4 h from 00:30, 20 s, no quiet hours. */
export const schedule = (over: Partial<PurgeSchedule> = {}): PurgeSchedule => ({
	enabled: true,
	interval_min: 240,
	duration_s: 20,
	offset_min: 30,
	quiet_hours: [],
	...over
});

/** Runs as ISO 8601 UTC, so a failing comparison reads as times. */
export const iso = (runs: Date[]) => runs.map((d) => d.toISOString());
export const ms = (text: string) => Date.parse(text);
