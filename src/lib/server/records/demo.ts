/**
 * Invented records for the demo fleet, so the records page has something to
 * show: a commissioning seal test, bore and journal measurements, yearly
 * wear-down readings with a limit, and a liner shrink-fit plan. Idempotent: a
 * shaft that already has wear readings is left alone.
 */
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import type { Actor } from '../audit';
import { DEMO_VESSELS } from '../demo/fleet';
import {
	addBearingMeasurement,
	addSealTest,
	addShrinkFit,
	addWearReading,
	setWearLimit
} from './service';

const DEMO: Actor = { userId: null, name: 'demo seed' };
/** the year each demo vessel's bearings were fitted (invented) */
const FITTED: Record<string, number> = {
	'corrin-bay': 2019,
	'hallow-tern': 2017,
	'lakeline-wren': 2021,
	'skerry-lark': 2022
};

export async function seedDemoRecords(db: Kysely<Database>): Promise<void> {
	for (const v of DEMO_VESSELS) {
		const shafts = await db
			.selectFrom('shafts')
			.innerJoin('vessels', 'vessels.id', 'shafts.vessel_id')
			.select(['shafts.id', 'shafts.vessel_id', 'shafts.diameter_mm'])
			.where('vessels.code', '=', v.code)
			.execute();
		for (const [i, s] of shafts.entries()) {
			const has = await db
				.selectFrom('wear_readings')
				.select('id')
				.where('shaft_id', '=', s.id)
				.executeTakeFirst();
			if (has) continue;
			const shaft = { id: s.id, vessel_id: s.vessel_id };
			const year = FITTED[v.code] ?? 2020;
			const fitted = Date.UTC(year, 2 + i, 12);
			const d = s.diameter_mm;
			await addSealTest(db, DEMO, shaft, {
				seal: 'aft',
				tested_at: fitted,
				test_pressure_bar: 3,
				hold_s: 180,
				resolution_bar: 0.01,
				leak_seen: false,
				readings: [0, 30, 60, 90, 120, 150, 180, 210, 240].map((t) => ({
					t_s: t,
					pressure_bar: t === 0 ? 1.2 : 3.01
				})),
				notes: 'commissioning, after fitting the aft seal'
			});
			// design clearance about 0.3 % of the diameter when fitted (invented for the demo)
			const journal = d;
			await addBearingMeasurement(db, DEMO, shaft, {
				bearing: 'aft',
				measured_at: fitted,
				bore_mm: Math.round((journal + d * 0.003) * 100) / 100,
				journal_mm: journal,
				max_clearance_mm: Math.round(d * 0.006 * 100) / 100,
				notes: 'as fitted'
			});
			await setWearLimit(db, DEMO, shaft, {
				wear_limit_mm: Math.round(d * 0.008 * 10) / 10,
				reason: 'bearing maker’s renewal figure (demo)'
			});
			// yearly readings: a steady wear of about 0.05 % of the diameter per year, with a little scatter
			const years = 2026 - year;
			for (let y = 0; y <= years; y++) {
				const scatter = [0, 0.04, -0.03, 0.02, -0.01, 0.03, -0.02, 0.01, 0][y % 9];
				await addWearReading(db, DEMO, shaft, {
					measured_at: Date.UTC(year + y, 2 + i, 12),
					reading_mm: Math.round((2 + y * d * 0.0005 + scatter) * 100) / 100,
					method: 'poker_gauge',
					notes: y === 0 ? 'baseline at installation' : 'annual reading in dry-dock'
				});
			}
			if (i === 0) {
				await addShrinkFit(db, DEMO, shaft, {
					bore_mm: d,
					interference_mm: Math.round(d * 0.001 * 100) / 100,
					assembly_clearance_mm: 0.15,
					material: 'bronze_c93200',
					ambient_c: 18,
					notes: 'spare liner, planned for the next dry-dock'
				});
			}
		}
	}
}
