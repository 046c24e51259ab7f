/**
 * Demo purge schedules, so a visitor sees purges within minutes and the simulator's timetable
 * (a 900 s cycle, simulator/timetable.ts) produces a missed purge and a valve stuck open.
 *
 * The timetable cycle starts when the simulator does, not on the clock, so an interval equal to
 * the cycle (15 min) would meet it at the same phase every time: always or never inside a fault.
 * A 20 min interval steps 300 s through the cycle, so of every three lakeline-wren purges two fall
 * in its stuck-valve window (120–720 s, 600 s wide) and are missed; 16 min steps 60 s, so corrin-bay
 * meets its valve-stuck-open window (600–840 s) in 4 of every 15 purges.
 */
import type { Kysely } from 'kysely';
import type { PurgeSchedule } from '$lib/purge';
import type { Database } from '../db/schema';
import { audit, SYSTEM } from '../audit';
import * as repo from './repository';
import { plain } from './schedule';

export const DEMO_PURGE_SCHEDULES: Record<string, PurgeSchedule> = {
	'corrin-bay': { enabled: true, interval_min: 16, duration_s: 20, offset_min: 2, quiet_hours: [] },
	'hallow-tern': {
		enabled: true,
		interval_min: 15,
		duration_s: 30,
		offset_min: 5,
		quiet_hours: []
	},
	'lakeline-wren': {
		enabled: true,
		interval_min: 20,
		duration_s: 25,
		offset_min: 7,
		quiet_hours: []
	},
	// alongside in Lisbon overnight, where (in this fictional demo) nothing may go overboard
	'skerry-lark': {
		enabled: true,
		interval_min: 15,
		duration_s: 20,
		offset_min: 10,
		quiet_hours: [{ from: '01:00', to: '05:00' }]
	}
};

/** Seeds a schedule for each demo vessel that has none; a second run changes nothing. */
export async function seedDemoPurgeSchedules(db: Kysely<Database>): Promise<void> {
	for (const [code, schedule] of Object.entries(DEMO_PURGE_SCHEDULES)) {
		const vessel = await db
			.selectFrom('vessels')
			.select('id')
			.where('code', '=', code)
			.executeTakeFirst();
		if (!vessel || (await repo.getSchedule(db, vessel.id))) continue;
		const at = Date.now();
		await repo.saveSchedule(db, vessel.id, schedule, at, 'demo seed');
		await audit(db, SYSTEM, {
			action: 'purge.schedule.update',
			entity: 'separator',
			entityId: vessel.id,
			vesselId: vessel.id,
			at,
			details: { reason: 'demo seed', before: null, after: plain(schedule) }
		});
	}
}
