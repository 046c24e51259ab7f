/**
 * Vessels and shafts, with the figures derived from their configuration:
 * each shaft's minimum flow and the sea pressure at its centreline.
 */
import type { Kysely } from 'kysely';
import { minimumFlow, minimumFlowUsRuleLpm } from '$lib/flow';
import { seaPressureAtCentreline } from '$lib/seawater';
import type { OperatingMode, ShaftPosition, WaterKind } from '$lib/types';
import type { ShaftCreate, ShaftUpdate, VesselCreate, VesselUpdate } from '$lib/schemas/fleet';
import type { Database, ShaftRow, VesselRow } from '../db/schema';

export interface Shaft {
	id: number;
	vessel_id: number;
	code: string;
	name: string;
	position: ShaftPosition;
	diameter_mm: number;
	water: WaterKind;
	centreline_depth_m: number;
	min_flow_factor_lpm_per_mm: number;
	/** derived: factor × diameter */
	min_flow_lpm: number;
	/** derived: the US customary rule (1 gpm per inch), in L/min, for comparison */
	min_flow_us_rule_lpm: number;
	/** derived: ρ g h at the centreline, gauge, with the customary density */
	sea_pressure_bar: number;
}

export interface Vessel {
	id: number;
	code: string;
	name: string;
	kind: string | null;
	time_zone: string;
	salinity_psu: number | null;
	operating_mode: OperatingMode;
}

export interface VesselWithShafts extends Vessel {
	shafts: Shaft[];
}

export function toShaft(row: ShaftRow): Shaft {
	return {
		id: row.id,
		vessel_id: row.vessel_id,
		code: row.code,
		name: row.name,
		position: row.position,
		diameter_mm: row.diameter_mm,
		water: row.water,
		centreline_depth_m: row.centreline_depth_m,
		min_flow_factor_lpm_per_mm: row.min_flow_factor_lpm_per_mm,
		min_flow_lpm: minimumFlow(row.diameter_mm, row.min_flow_factor_lpm_per_mm),
		min_flow_us_rule_lpm: minimumFlowUsRuleLpm(row.diameter_mm),
		sea_pressure_bar: seaPressureAtCentreline(row.centreline_depth_m, row.water)
	};
}

export function toVessel(row: VesselRow): Vessel {
	return {
		id: row.id,
		code: row.code,
		name: row.name,
		kind: row.kind,
		time_zone: row.time_zone,
		salinity_psu: row.salinity_psu,
		operating_mode: row.operating_mode
	};
}

const POSITION_ORDER: Record<ShaftPosition, number> = { port: 0, centre: 1, starboard: 2 };

/** Vessels (all, or only `ids`) with their shafts, port to starboard. */
export async function listVessels(
	db: Kysely<Database>,
	ids: number[] | 'all'
): Promise<VesselWithShafts[]> {
	if (ids !== 'all' && ids.length === 0) return [];
	const vessels = await db
		.selectFrom('vessels')
		.selectAll()
		.$if(ids !== 'all', (q) => q.where('id', 'in', ids as number[]))
		.orderBy('name')
		.execute();
	if (!vessels.length) return [];
	const shafts = await db
		.selectFrom('shafts')
		.selectAll()
		.where(
			'vessel_id',
			'in',
			vessels.map((v) => v.id)
		)
		.execute();
	return vessels.map((v) => ({
		...toVessel(v),
		shafts: shafts
			.filter((s) => s.vessel_id === v.id)
			.sort((a, b) => POSITION_ORDER[a.position] - POSITION_ORDER[b.position] || a.code.localeCompare(b.code))
			.map(toShaft)
	}));
}

export async function getVessel(db: Kysely<Database>, id: number): Promise<VesselWithShafts | undefined> {
	const [vessel] = await listVessels(db, [id]);
	return vessel;
}

export async function getVesselRow(db: Kysely<Database>, id: number) {
	return db.selectFrom('vessels').selectAll().where('id', '=', id).executeTakeFirst();
}

export async function getShaft(db: Kysely<Database>, id: number): Promise<Shaft | undefined> {
	const row = await db.selectFrom('shafts').selectAll().where('id', '=', id).executeTakeFirst();
	return row && toShaft(row);
}

export async function createVessel(db: Kysely<Database>, input: VesselCreate): Promise<number> {
	const row = await db
		.insertInto('vessels')
		.values({
			code: input.code,
			name: input.name,
			kind: input.kind ?? null,
			time_zone: input.time_zone,
			salinity_psu: input.salinity_psu ?? null,
			created_at: Date.now()
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	return row.id;
}

export async function updateVessel(db: Kysely<Database>, id: number, input: VesselUpdate) {
	if (!Object.keys(input).length) return; // nothing to set: SQL has no empty SET
	await db.updateTable('vessels').set(input).where('id', '=', id).execute();
}

export async function setOperatingMode(db: Kysely<Database>, id: number, mode: OperatingMode) {
	await db.updateTable('vessels').set({ operating_mode: mode }).where('id', '=', id).execute();
}

export async function createShaft(
	db: Kysely<Database>,
	vesselId: number,
	input: ShaftCreate
): Promise<number> {
	const row = await db
		.insertInto('shafts')
		.values({ ...input, vessel_id: vesselId, created_at: Date.now() })
		.returning('id')
		.executeTakeFirstOrThrow();
	return row.id;
}

export async function updateShaft(db: Kysely<Database>, id: number, input: ShaftUpdate) {
	if (!Object.keys(input).length) return; // nothing to set: SQL has no empty SET
	await db.updateTable('shafts').set(input).where('id', '=', id).execute();
}
