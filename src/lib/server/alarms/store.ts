/**
 * Persisting alarm transitions. Every change of an alarm instance is one
 * transaction: the instance row, its event (who, when, value, comment), and
 * whatever the notifier queues (the e-mail outbox), so a message is queued if
 * and only if the transition was stored. Transitions are written one at a time,
 * in the order they happened, from a single queue.
 */
import type { Kysely, Transaction } from 'kysely';
import type { AlarmState, AlarmStatus } from '$lib/alarms/state-machine';
import type { AlarmType, Priority } from '$lib/alarms/types';
import type { Database } from '../db/schema';
import { toAlarmView, type AlarmView } from './view';

/** An open alarm instance as the engine holds it in memory. */
export interface Instance {
	id: number | null;
	key: string;
	vesselId: number;
	shaftId: number | null;
	type: AlarmType;
	priority: Priority;
	status: AlarmStatus;
	state: AlarmState;
	raised_at: number;
	value: number | null;
	limit_value: number | null;
	last_value: number | null;
	cleared_at: number | null;
	acknowledged_at: number | null;
	acknowledged_by: string | null;
	ended_at: number | null;
}

export interface TransitionRecord {
	event: string;
	from: AlarmState | null;
	to: AlarmState;
	at: number;
	userId: string | null;
	actor: string;
	value: number | null;
	comment: string | null;
}

export interface AlarmTransition {
	alarm: AlarmView;
	transition: TransitionRecord;
}

/** Called inside the transaction of each stored transition (the mailer queues its messages here). */
export interface AlarmNotifier {
	onTransition(trx: Transaction<Database>, change: AlarmTransition): Promise<void>;
}

function row(inst: Instance) {
	return {
		vessel_id: inst.vesselId,
		shaft_id: inst.shaftId,
		type: inst.type,
		priority: inst.priority,
		state: inst.state,
		active: inst.status.active ? 1 : 0,
		acknowledged: inst.status.acknowledged ? 1 : 0,
		shelved_until: inst.status.shelved_until,
		suppressed: inst.status.suppressed ? 1 : 0,
		out_of_service: inst.status.out_of_service ? 1 : 0,
		raised_at: inst.raised_at,
		value: inst.value,
		limit_value: inst.limit_value,
		last_value: inst.last_value,
		cleared_at: inst.cleared_at,
		acknowledged_at: inst.acknowledged_at,
		acknowledged_by: inst.acknowledged_by,
		ended_at: inst.ended_at,
		updated_at: Date.now()
	};
}

export class AlarmStore {
	#queue: Promise<unknown> = Promise.resolve();
	notifier: AlarmNotifier | null = null;
	onStored: (change: AlarmTransition) => void = () => {};

	constructor(private readonly db: Kysely<Database>) {}

	/** Queues the instance as it is now, with the transition that made it so. */
	save(inst: Instance, transition: TransitionRecord): Promise<AlarmView> {
		const snapshot = row(inst);
		const job = this.#queue.then(async () => {
			const change = await this.db.transaction().execute(async (trx) => {
				if (inst.id === null) {
					const inserted = await trx.insertInto('alarms').values(snapshot).returning('id').executeTakeFirstOrThrow();
					inst.id = inserted.id;
				} else {
					await trx.updateTable('alarms').set(snapshot).where('id', '=', inst.id).execute();
				}
				await trx
					.insertInto('alarm_events')
					.values({
						alarm_id: inst.id,
						at: transition.at,
						event: transition.event,
						from_state: transition.from,
						to_state: transition.to,
						user_id: transition.userId,
						actor: transition.actor,
						value: transition.value,
						comment: transition.comment
					})
					.execute();
				const stored = await trx.selectFrom('alarms').selectAll().where('id', '=', inst.id).executeTakeFirstOrThrow();
				const change: AlarmTransition = { alarm: toAlarmView(stored), transition };
				await this.notifier?.onTransition(trx, change);
				return change;
			});
			this.onStored(change);
			return change.alarm;
		});
		this.#queue = job.catch((err) => console.error('[aftwater] storing an alarm transition failed:', err));
		return job;
	}

	/** Resolves when every transition queued so far is stored. */
	async idle(): Promise<void> {
		let current;
		do {
			current = this.#queue;
			await current;
		} while (current !== this.#queue);
	}

	async openInstances(): Promise<Instance[]> {
		const rows = await this.db.selectFrom('alarms').selectAll().where('ended_at', 'is', null).execute();
		return rows.map((r) => ({
			id: r.id,
			key: instanceKey(r.vessel_id, r.shaft_id, r.type),
			vesselId: r.vessel_id,
			shaftId: r.shaft_id,
			type: r.type,
			priority: r.priority,
			status: {
				active: !!r.active,
				acknowledged: !!r.acknowledged,
				shelved_until: r.shelved_until,
				suppressed: !!r.suppressed,
				out_of_service: !!r.out_of_service
			},
			state: r.state,
			raised_at: r.raised_at,
			value: r.value,
			limit_value: r.limit_value,
			last_value: r.last_value,
			cleared_at: r.cleared_at,
			acknowledged_at: r.acknowledged_at,
			acknowledged_by: r.acknowledged_by,
			ended_at: null
		}));
	}
}

export const instanceKey = (vesselId: number, shaftId: number | null, type: AlarmType) =>
	`${vesselId}:${shaftId ?? 'separator'}:${type}`;
