/**
 * Alarms as one running part: the settings, the engine fed by the ingest
 * pipeline, the stale-data timer, and the operator's actions.
 */
import type { AlarmType } from '$lib/alarms/types';
import { minimumFlow } from '$lib/flow';
import type { AppContext } from '../context';
import { audit, type Actor } from '../audit';
import { AlarmEngine } from './engine';
import { AlarmSettingsStore } from './settings-store';
import { AlarmStore } from './store';

export interface AlarmService {
	engine: AlarmEngine;
	settings: AlarmSettingsStore;
	store: AlarmStore;
	reloadFleet(): Promise<void>;
	/** out of service by hand (admin or chief engineer), with a reason; audited */
	setOutOfService(
		target: { vesselId: number; shaftId: number | null; type: AlarmType },
		removed: boolean,
		reason: string,
		actor: Actor
	): Promise<void>;
	stop(): Promise<void>;
}

const TICK_MS = 1_000;

export async function startAlarms(ctx: AppContext): Promise<AlarmService> {
	const { db } = ctx;
	const settings = new AlarmSettingsStore(db);
	await settings.load();
	const store = new AlarmStore(db);
	store.onStored = (change) => ctx.events.emit('alarm.changed', change);
	const engine = new AlarmEngine(store, settings);

	const removals = await db.selectFrom('alarm_removals').selectAll().where('returned_at', 'is', null).execute();
	engine.restore(
		await store.openInstances(),
		removals.map((r) => ({ vesselId: r.vessel_id, shaftId: r.shaft_id, type: r.type }))
	);

	const reloadFleet = async () => {
		const shafts = await db.selectFrom('shafts').selectAll().execute();
		const vessels = await db.selectFrom('vessels').select(['id', 'operating_mode', 'salinity_psu']).execute();
		engine.setFleet(
			shafts.map((s) => ({
				id: s.id,
				vesselId: s.vessel_id,
				minFlowLpm: minimumFlow(s.diameter_mm, s.min_flow_factor_lpm_per_mm),
				centrelineDepthM: s.centreline_depth_m,
				water: s.water
			})),
			vessels.map((v) => ({ id: v.id, mode: v.operating_mode, salinityPsu: v.salinity_psu }))
		);
	};
	await reloadFleet();
	const offConfig = ctx.events.on('config.changed', () => void reloadFleet());

	const telemetry = ctx.services.telemetry;
	let unlisten = () => {};
	if (telemetry) {
		// the stale threshold is also where compliance treats a gap as unknown
		telemetry.registry.staleAfterS = (shaftId) => settings.forShaft(shaftId).stale_after_s;
		await telemetry.reload();
		if (ctx.config.ALARM_RULES) {
			unlisten = telemetry.pipeline.listen({
				sample: (e) => engine.onSample(e),
				separator: (e) => engine.onSeparator(e)
			});
		}
	}
	const timer = setInterval(() => {
		try {
			if (ctx.config.ALARM_RULES) engine.tick();
		} catch (err) {
			console.error('[aftwater] alarm timer:', err);
		}
	}, TICK_MS);
	timer.unref();

	return {
		engine,
		settings,
		store,
		reloadFleet,
		async setOutOfService(target, removed, reason, actor) {
			const { vesselId, shaftId, type } = target;
			if (engine.isRemoved(vesselId, shaftId, type) === removed) return;
			await db.transaction().execute(async (trx) => {
				if (removed) {
					await trx
						.insertInto('alarm_removals')
						.values({ vessel_id: vesselId, shaft_id: shaftId, type, reason, removed_at: Date.now(), removed_by: actor.name, returned_at: null, returned_by: null })
						.execute();
				} else {
					await trx
						.updateTable('alarm_removals')
						.set({ returned_at: Date.now(), returned_by: actor.name })
						.where('vessel_id', '=', vesselId)
						.where((eb) => (shaftId === null ? eb('shaft_id', 'is', null) : eb('shaft_id', '=', shaftId)))
						.where('type', '=', type)
						.where('returned_at', 'is', null)
						.execute();
				}
				await audit(trx, actor, {
					action: removed ? 'alarm.remove_from_service' : 'alarm.return_to_service',
					entity: shaftId === null ? 'separator' : 'shaft',
					entityId: shaftId ?? vesselId,
					vesselId,
					details: { type, reason }
				});
			});
			engine.setRemoved(vesselId, shaftId, type, removed);
		},
		async stop() {
			clearInterval(timer);
			unlisten();
			offConfig();
			await store.idle();
		}
	};
}
