/**
 * Vessel and shaft codes → ids and the figures ingest needs, held in memory
 * so a message costs no database read. Reloaded when configuration changes.
 */
import type { Kysely } from 'kysely';
import { minimumFlow } from '$lib/flow';
import { minimumTimeline, type MinimumChange, type MinimumSpan } from '$lib/minimums';
import type { Database } from '../db/schema';

export interface ShaftEntry {
	id: number;
	code: string;
	vesselId: number;
	/** the minimum flow now in force */
	minFlowLpm: number;
	/** the minimums in force over time, oldest first (the last is minFlowLpm) */
	minimums: MinimumSpan[];
	/** a gap in samples longer than this is unknown time (the stale threshold) */
	gapMs: number;
}

export interface VesselEntry {
	id: number;
	code: string;
	shafts: Map<string, ShaftEntry>;
}

export const DEFAULT_STALE_AFTER_S = 30;

export class Registry {
	#vessels = new Map<string, VesselEntry>();
	#byId = new Map<number, VesselEntry>();
	#shafts = new Map<number, ShaftEntry>();
	/** stale threshold per shaft, from the alarm settings when they exist */
	staleAfterS: (shaftId: number) => number = () => DEFAULT_STALE_AFTER_S;

	async load(db: Kysely<Database>) {
		const vessels = await db.selectFrom('vessels').select(['id', 'code']).execute();
		const shafts = await db
			.selectFrom('shafts')
			.select(['id', 'code', 'vessel_id', 'diameter_mm', 'min_flow_factor_lpm_per_mm'])
			.execute();
		const changes = new Map<number, MinimumChange[]>();
		for (const c of await db
			.selectFrom('shaft_minimum_changes')
			.select(['shaft_id', 'changed_at', 'from_lpm', 'to_lpm'])
			.orderBy('shaft_id')
			.orderBy('changed_at')
			.execute()) {
			let list = changes.get(c.shaft_id);
			if (!list) changes.set(c.shaft_id, (list = []));
			list.push(c);
		}
		const next = new Map<string, VesselEntry>();
		const byId = new Map<number, VesselEntry>();
		const shaftMap = new Map<number, ShaftEntry>();
		for (const v of vessels) {
			const entry: VesselEntry = { id: v.id, code: v.code, shafts: new Map() };
			next.set(v.code, entry);
			byId.set(v.id, entry);
		}
		for (const s of shafts) {
			const vessel = byId.get(s.vessel_id);
			if (!vessel) continue;
			const minFlowLpm = minimumFlow(s.diameter_mm, s.min_flow_factor_lpm_per_mm);
			const entry: ShaftEntry = {
				id: s.id,
				code: s.code,
				vesselId: s.vessel_id,
				minFlowLpm,
				minimums: minimumTimeline(changes.get(s.id) ?? [], minFlowLpm),
				gapMs: this.staleAfterS(s.id) * 1000
			};
			vessel.shafts.set(s.code, entry);
			shaftMap.set(s.id, entry);
		}
		this.#vessels = next;
		this.#byId = byId;
		this.#shafts = shaftMap;
	}

	vessel(code: string) {
		return this.#vessels.get(code);
	}
	vesselById(id: number) {
		return this.#byId.get(id);
	}
	shaft(id: number) {
		return this.#shafts.get(id);
	}
	vessels() {
		return [...this.#vessels.values()];
	}
	shafts() {
		return [...this.#shafts.values()];
	}
}
