/**
 * The rules engine: every stored sample is judged against its shaft's limits
 * inside the ingest path (synchronously, a few microseconds a sample), plus a
 * timer for stale data and the end of shelving. Conditions go through on- and
 * off-delays with deadbands ($lib/alarms/debounce) and the ISA-18.2 state
 * machine ($lib/alarms/state-machine); each transition is stored by AlarmStore.
 */
import {
	ALARM_PRIORITY,
	OUT_OF_SERVICE_IN_DRY_DOCK,
	SHAFT_ALARM_TYPES,
	SUPPRESSIBLE_WHEN_STOPPED,
	type AlarmType
} from '$lib/alarms/types';
import { debounceDelays, type AlarmSettings } from '$lib/alarms/settings';
import { Debouncer } from '$lib/alarms/debounce';
import { StuckDetector } from '$lib/alarms/stuck';
import {
	isStale,
	isSuppressedByDesign,
	isTurning,
	separatorDpHigh,
	shaftConditions,
	type Condition
} from '$lib/alarms/conditions';
import { alarmState, isActiveInstance, NORMAL_STATUS, reduce, type AlarmEvent } from '$lib/alarms/state-machine';
import { seaPressureAtCentreline } from '$lib/seawater';
import type { OperatingMode, WaterKind } from '$lib/types';
import type { SampleEvent, SeparatorEvent } from '../ingest/pipeline';
import type { AlarmSettingsStore } from './settings-store';
import { instanceKey, type AlarmStore, type Instance, type TransitionRecord } from './store';
import type { AlarmView } from './view';

export interface ShaftFacts {
	id: number;
	vesselId: number;
	minFlowLpm: number;
	centrelineDepthM: number;
	water: WaterKind;
}

export interface VesselFacts {
	id: number;
	mode: OperatingMode;
	salinityPsu: number | null;
}

export interface Actor {
	userId: string | null;
	name: string;
}
const SYSTEM: Actor = { userId: null, name: 'system' };

export class AlarmError extends Error {}

export class AlarmEngine {
	#open = new Map<string, Instance>();
	#byId = new Map<number, Instance>();
	#debouncers = new Map<string, Debouncer>();
	#stuck = new Map<number, StuckDetector>();
	/** wall-clock time of each shaft's latest message, for stale data */
	#lastSeen = new Map<number, number>();
	#removed = new Set<string>();
	#shafts = new Map<number, ShaftFacts>();
	#vessels = new Map<number, VesselFacts>();
	readonly startedAt: number;

	constructor(
		private readonly store: AlarmStore,
		private readonly settings: AlarmSettingsStore,
		private readonly now: () => number = Date.now
	) {
		this.startedAt = now();
	}

	/** Takes the open instances and manual removals from the database at start-up. */
	restore(open: Instance[], removals: { vesselId: number; shaftId: number | null; type: AlarmType }[]) {
		for (const inst of open) {
			this.#open.set(inst.key, inst);
			if (inst.id !== null) this.#byId.set(inst.id, inst);
		}
		for (const r of removals) this.#removed.add(instanceKey(r.vesselId, r.shaftId, r.type));
	}

	/** The facts the rules need; a vessel's mode change re-judges its out-of-service state. */
	setFleet(shafts: ShaftFacts[], vessels: VesselFacts[]) {
		this.#shafts = new Map(shafts.map((s) => [s.id, s]));
		this.#vessels = new Map(vessels.map((v) => [v.id, v]));
		for (const inst of this.#open.values()) this.#applyService(inst, this.now());
		// settings may have changed: delays live in the debouncers
		for (const [key, d] of this.#debouncers) {
			const [shaft, type] = key.split('|');
			const s = shaft.startsWith('v') ? this.settings.forVessel(Number(shaft.slice(1))) : this.settings.forShaft(Number(shaft));
			this.#debouncers.set(key, new Debouncer(debounceDelays(type as AlarmType, s), d.state));
		}
		this.#stuck.clear();
	}

	open(): Instance[] {
		return [...this.#open.values()];
	}

	byId(id: number): Instance | undefined {
		return this.#byId.get(id);
	}

	#debouncer(scope: string, type: AlarmType, s: AlarmSettings, openNow: boolean) {
		const key = `${scope}|${type}`;
		let d = this.#debouncers.get(key);
		if (!d) {
			// an alarm restored as active must be able to clear
			d = new Debouncer(debounceDelays(type, s), { active: openNow, trip_since: null, clear_since: null, last_at: null });
			this.#debouncers.set(key, d);
		}
		return d;
	}

	#outOfService(vesselId: number, shaftId: number | null, type: AlarmType) {
		return (
			this.#removed.has(instanceKey(vesselId, shaftId, type)) ||
			(this.#vessels.get(vesselId)?.mode === 'dry_dock' && OUT_OF_SERVICE_IN_DRY_DOCK.includes(type))
		);
	}

	onSample(e: SampleEvent) {
		if (e.origin !== 'live') return; // an uploaded logger file is history, not news
		const at = this.now();
		this.#lastSeen.set(e.shaft.id, at);
		const staleKey = instanceKey(e.shaft.vesselId, e.shaft.id, 'stale_data');
		if (this.#open.get(staleKey)?.status.active) this.#clear(this.#open.get(staleKey)!, at, null);
		if (!e.newest) return; // a replay of the past is stored, not judged again
		if (e.clockStepped) this.#reanchor(e.shaft.id);
		const facts = this.#shafts.get(e.shaft.id);
		if (!facts) return;
		const s = this.settings.forShaft(e.shaft.id);
		const sample = { ts: e.ts, flow_lpm: e.flow_lpm, supply_bar: e.supply_bar, temp_c: e.temp_c, shaft_rpm: e.shaft_rpm };
		const vessel = this.#vessels.get(facts.vesselId);
		const limits = {
			min_flow_lpm: facts.minFlowLpm,
			sea_pressure_bar: seaPressureAtCentreline(facts.centrelineDepthM, facts.water, {
				salinityPsu: vessel?.salinityPsu,
				tempC: e.temp_c
			})
		};
		let stuck = this.#stuck.get(e.shaft.id);
		if (!stuck) this.#stuck.set(e.shaft.id, (stuck = new StuckDetector(s.sensor_stuck_s)));
		const frozen = stuck.update(e.ts, e.flow_lpm, isTurning(sample, s));
		const conditions = shaftConditions(sample, limits, s, frozen);
		for (const type of SHAFT_ALARM_TYPES) {
			if (type === 'stale_data') continue;
			const c = conditions[type as keyof typeof conditions] as Condition | { tripping: boolean; clearing: boolean } | null;
			if (!c) continue;
			const key = instanceKey(facts.vesselId, facts.id, type);
			const inst = this.#open.get(key);
			const out = this.#debouncer(String(facts.id), type, s, !!inst?.status.active).update(e.ts, c.tripping, c.clearing);
			const value = 'value' in c ? c.value : e.flow_lpm;
			const limit = 'trip_limit' in c ? c.trip_limit : null;
			const suppressed = isSuppressedByDesign(type, sample, s);
			if (inst) {
				inst.last_value = value;
				if (SUPPRESSIBLE_WHEN_STOPPED.includes(type) && inst.status.suppressed !== suppressed) {
					this.#apply(inst, { type: suppressed ? 'suppress' : 'unsuppress', at }, SYSTEM, value, null);
				}
			}
			if (out === 'raise') this.#raise(facts.vesselId, facts.id, type, at, value, limit, suppressed);
			else if (out === 'clear' && inst) this.#clear(inst, at, value);
		}
	}

	/**
	 * The gateway's clock went back: the shaft's timers, measured in its sample time, start again
	 * from the new timestamps (an active alarm stays active; a hold under way starts over).
	 */
	#reanchor(shaftId: number) {
		for (const type of SHAFT_ALARM_TYPES) {
			const key = `${shaftId}|${type}`;
			const d = this.#debouncers.get(key);
			if (d) this.#debouncers.set(key, new Debouncer(d.delays, { active: d.active, trip_since: null, clear_since: null, last_at: null }));
		}
		this.#stuck.delete(shaftId);
	}

	onSeparator(e: SeparatorEvent) {
		if (!e.newest || e.dp_bar === null) return;
		const s = this.settings.forVessel(e.vesselId);
		const c = separatorDpHigh({ ts: e.ts, dp_bar: e.dp_bar }, s);
		if (!c) return;
		const key = instanceKey(e.vesselId, null, 'separator_dp_high');
		const inst = this.#open.get(key);
		const out = this.#debouncer(`v${e.vesselId}`, 'separator_dp_high', s, !!inst?.status.active).update(e.ts, c.tripping, c.clearing);
		const at = this.now();
		if (out === 'raise') this.#raise(e.vesselId, null, 'separator_dp_high', at, c.value, c.trip_limit, false);
		else if (out === 'clear' && inst) this.#clear(inst, at, c.value);
	}

	/** Raised by another part (the purge check): purge_missed, purge_valve_stuck_open. */
	raise(vesselId: number, shaftId: number | null, type: AlarmType, value: number | null = null, limit: number | null = null) {
		this.#raise(vesselId, shaftId, type, this.now(), value, limit, false);
	}

	clear(vesselId: number, shaftId: number | null, type: AlarmType) {
		const inst = this.#open.get(instanceKey(vesselId, shaftId, type));
		if (inst?.status.active) this.#clear(inst, this.now(), null);
	}

	/** Stale data and the end of shelving; called every few seconds. */
	tick() {
		const at = this.now();
		for (const facts of this.#shafts.values()) {
			const s = this.settings.forShaft(facts.id);
			const seen = Math.max(this.#lastSeen.get(facts.id) ?? 0, this.startedAt);
			const key = instanceKey(facts.vesselId, facts.id, 'stale_data');
			if (isStale(seen, at, s) && !this.#open.get(key)?.status.active) {
				this.#raise(facts.vesselId, facts.id, 'stale_data', at, Math.round((at - seen) / 1000), s.stale_after_s, false);
			}
		}
		for (const inst of this.#open.values()) {
			if (inst.status.shelved_until !== null && inst.status.shelved_until <= at) {
				this.#apply(inst, { type: 'shelve_expired', at }, SYSTEM, null, null);
			}
		}
	}

	#raise(vesselId: number, shaftId: number | null, type: AlarmType, at: number, value: number | null, limit: number | null, suppressed: boolean) {
		const key = instanceKey(vesselId, shaftId, type);
		const existing = this.#open.get(key);
		if (existing) {
			existing.value = value;
			existing.limit_value = limit;
			this.#apply(existing, { type: 'activate', at }, SYSTEM, value, null);
			return;
		}
		const status = {
			...NORMAL_STATUS,
			active: true,
			acknowledged: false,
			suppressed,
			out_of_service: this.#outOfService(vesselId, shaftId, type)
		};
		const inst: Instance = {
			id: null,
			key,
			vesselId,
			shaftId,
			type,
			priority: ALARM_PRIORITY[type],
			status,
			state: alarmState(status),
			raised_at: at,
			value,
			limit_value: limit,
			last_value: value,
			cleared_at: null,
			acknowledged_at: null,
			acknowledged_by: null,
			ended_at: null
		};
		this.#open.set(key, inst);
		this.#save(inst, { event: 'raise', from: 'normal', to: inst.state, at, userId: null, actor: 'system', value, comment: null });
	}

	#clear(inst: Instance, at: number, value: number | null) {
		this.#apply(inst, { type: 'clear', at }, SYSTEM, value, null);
	}

	#applyService(inst: Instance, at: number) {
		const oos = this.#outOfService(inst.vesselId, inst.shaftId, inst.type);
		if (oos !== inst.status.out_of_service) {
			this.#apply(inst, { type: oos ? 'remove_from_service' : 'return_to_service', at }, SYSTEM, null, null);
		}
	}

	/** Applies an event; returns the error text when it cannot apply. */
	#apply(inst: Instance, event: AlarmEvent, actor: Actor, value: number | null, comment: string | null) {
		const t = reduce(inst.status, event);
		if ('error' in t) return { error: t.error };
		if (!t.changed) return { promise: null };
		inst.status = t.status;
		inst.state = t.to;
		if (event.type === 'clear') inst.cleared_at = event.at;
		if (event.type === 'acknowledge') {
			inst.acknowledged_at = event.at;
			inst.acknowledged_by = actor.name;
		}
		if (event.type === 'activate') {
			inst.acknowledged_at = null;
			inst.acknowledged_by = null;
		}
		if (!isActiveInstance(inst.status)) {
			inst.ended_at = event.at;
			this.#open.delete(inst.key);
			if (inst.id !== null) this.#byId.delete(inst.id);
		}
		const promise = this.#save(inst, {
			event: event.type,
			from: t.from,
			to: t.to,
			at: event.at,
			userId: actor.userId,
			actor: actor.name,
			value,
			comment
		});
		return { promise };
	}

	#save(inst: Instance, record: TransitionRecord): Promise<AlarmView> {
		const p = this.store.save(inst, record);
		p.then(() => {
			if (inst.id !== null && inst.ended_at === null) this.#byId.set(inst.id, inst);
		}, () => {});
		return p;
	}

	/** An operator's action on an open alarm; throws AlarmError when it cannot apply. */
	async act(id: number, event: AlarmEvent, actor: Actor, comment: string | null): Promise<AlarmView> {
		const inst = this.#byId.get(id);
		if (!inst) throw new AlarmError('the alarm has returned to normal; there is nothing to do');
		const result = this.#apply(inst, event, actor, inst.last_value, comment);
		if ('error' in result) throw new AlarmError(result.error);
		if (!result.promise) throw new AlarmError('nothing changed');
		return result.promise;
	}

	/** Takes an alarm type of a shaft (or the vessel's separator) out of service, or back. */
	setRemoved(vesselId: number, shaftId: number | null, type: AlarmType, removed: boolean) {
		const key = instanceKey(vesselId, shaftId, type);
		if (removed) this.#removed.add(key);
		else this.#removed.delete(key);
		const inst = this.#open.get(key);
		if (inst) this.#applyService(inst, this.now());
	}

	isRemoved(vesselId: number, shaftId: number | null, type: AlarmType) {
		return this.#removed.has(instanceKey(vesselId, shaftId, type));
	}
}
