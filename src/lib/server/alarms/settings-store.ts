/**
 * Alarm settings per shaft, and per vessel for its separator, in memory with
 * the database behind them. A shaft without a row uses the defaults.
 * Changing them is for the vessel's chief engineer and admins, always audited.
 */
import type { Kysely } from 'kysely';
import {
	alarmSettings,
	applyAlarmSettingsUpdate,
	DEFAULT_ALARM_SETTINGS,
	type AlarmSettings,
	type AlarmSettingsUpdate
} from '$lib/alarms/settings';
import type { Database } from '../db/schema';
import { invalid } from '../api/errors';
import { audit, diff, type Actor } from '../audit';

function parseStored(json: string): AlarmSettings {
	try {
		const parsed = alarmSettings.safeParse(JSON.parse(json));
		if (parsed.success) return parsed.data;
	} catch {
		/* fall through: a damaged row must not stop the alarms */
	}
	console.error('[aftwater] stored alarm settings are invalid; using the defaults');
	return DEFAULT_ALARM_SETTINGS;
}

export class AlarmSettingsStore {
	#shaft = new Map<number, AlarmSettings>();
	#vessel = new Map<number, AlarmSettings>();

	constructor(private readonly db: Kysely<Database>) {}

	async load() {
		const shafts = await this.db.selectFrom('alarm_settings').selectAll().execute();
		const vessels = await this.db.selectFrom('vessel_alarm_settings').selectAll().execute();
		this.#shaft = new Map(shafts.map((r) => [r.shaft_id, parseStored(r.settings)]));
		this.#vessel = new Map(vessels.map((r) => [r.vessel_id, parseStored(r.settings)]));
	}

	forShaft(shaftId: number): AlarmSettings {
		return this.#shaft.get(shaftId) ?? DEFAULT_ALARM_SETTINGS;
	}

	/** The separator's settings (its ΔP setpoint and delays). */
	forVessel(vesselId: number): AlarmSettings {
		return this.#vessel.get(vesselId) ?? DEFAULT_ALARM_SETTINGS;
	}

	async update(
		target: { shaftId: number; vesselId: number } | { vesselId: number; shaftId?: undefined },
		update: AlarmSettingsUpdate,
		actor: Actor
	): Promise<AlarmSettings> {
		const current = target.shaftId !== undefined ? this.forShaft(target.shaftId) : this.forVessel(target.vesselId);
		const result = applyAlarmSettingsUpdate(current, update);
		if (!result.success) throw invalid(result.error);
		const next = result.data;
		const changes = diff(current, next);
		if (!Object.keys(changes).length) return current;
		const values = { settings: JSON.stringify(next), updated_at: Date.now(), updated_by: actor.name };
		await this.db.transaction().execute(async (trx) => {
			if (target.shaftId !== undefined) {
				await trx
					.insertInto('alarm_settings')
					.values({ shaft_id: target.shaftId, ...values })
					.onConflict((oc) => oc.column('shaft_id').doUpdateSet(values))
					.execute();
			} else {
				await trx
					.insertInto('vessel_alarm_settings')
					.values({ vessel_id: target.vesselId, ...values })
					.onConflict((oc) => oc.column('vessel_id').doUpdateSet(values))
					.execute();
			}
			await audit(trx, actor, {
				action: 'alarm_settings.update',
				entity: target.shaftId !== undefined ? 'shaft' : 'separator',
				entityId: target.shaftId ?? target.vesselId,
				vesselId: target.vesselId,
				details: changes
			});
		});
		if (target.shaftId !== undefined) this.#shaft.set(target.shaftId, next);
		else this.#vessel.set(target.vesselId, next);
		return next;
	}
}
