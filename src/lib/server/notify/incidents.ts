/**
 * The AlarmNotifier: called inside the transaction of every stored alarm
 * transition, it keeps the incident bookkeeping that decides what is e-mailed,
 * and queues what is due at once (an acknowledgement follow-up) in the same
 * transaction. First messages are not queued here: they wait HOLD_MS for the
 * rest of their vessel's batch (dispatch.ts), which is kept in the database as
 * `pending` with a due time, so a restart loses none.
 *
 * An incident is one alarm of a shaft (or the separator) and type. A new
 * instance of the same vessel, shaft and type raised within the vessel's
 * incident_holdoff_s after the previous one returned to normal belongs to the
 * same incident: it sends nothing new and its follow-ups go to the same thread.
 */
import { sql, type Transaction, type Updateable } from 'kysely';
import type { AlarmNotifier, AlarmTransition } from '../alarms/store';
import type { Database } from '../db/schema';
import type { IncidentRow, NotifyIncidentsTable } from '../db/tables/notify';
import { coveredBy, FLOOD_RATE_WINDOW_MS, holdFor } from './policy';
import { actorName } from './recipients';
import { getSettings } from './settings';
import { sendAckFollowup } from './messages';

type Trx = Transaction<Database>;

/** States that wait for an operator's acknowledgement, in view. */
const WAITING = new Set(['unacknowledged', 'returned_unacknowledged']);

export class IncidentNotifier implements AlarmNotifier {
	constructor(private readonly log: (message: string, err?: unknown) => void) {}

	async onTransition(trx: Trx, change: AlarmTransition): Promise<void> {
		// A fault here must not lose the alarm's transition: the savepoint undoes only
		// the notification's writes, the alarm is stored, and the fault is logged.
		await sql`savepoint notify`.execute(trx);
		try {
			await this.#handle(trx, change);
			await sql`release savepoint notify`.execute(trx);
		} catch (err) {
			await sql`rollback to savepoint notify`.execute(trx);
			await sql`release savepoint notify`.execute(trx);
			this.log(`alarm ${change.alarm.id} (${change.transition.event}): no e-mail queued`, err);
		}
	}

	async #handle(trx: Trx, { alarm, transition }: AlarmTransition) {
		const now = transition.at;
		let inc = await trx
			.selectFrom('notify_incidents')
			.selectAll()
			.where('current_alarm_id', '=', alarm.id)
			.executeTakeFirst();
		if (!inc) inc = await this.#attach(trx, alarm, now);

		const patch: Updateable<NotifyIncidentsTable> = {};
		// the escalation clock runs while the alarm waits in view for an answer; a hidden
		// alarm (shelved, suppressed, out of service) or an answered one stops it
		if (WAITING.has(alarm.state)) {
			if (inc.unacked_since === null) patch.unacked_since = now;
		} else if (inc.unacked_since !== null) {
			patch.unacked_since = null;
		}
		if (transition.event === 'acknowledge') {
			patch.acknowledged_at = now;
			patch.acknowledged_by = await actorName(trx, transition.userId, transition.actor);
			patch.ack_comment = transition.comment;
		}
		if (alarm.ended_at !== null) patch.ended_at = alarm.ended_at;

		// shown for the first time: its first message waits for the vessel's batch
		if (alarm.state === 'unacknowledged' && inc.phase === 'hidden') {
			if (await this.#covered(trx, inc)) {
				patch.phase = 'covered';
			} else {
				patch.phase = 'pending';
				patch.annunciated_at = now;
				patch.due_at = await batchDue(trx, inc.vessel_id, now);
			}
		}
		if (Object.keys(patch).length) {
			await trx.updateTable('notify_incidents').set(patch).where('id', '=', inc.id).execute();
		}
		if (transition.event === 'acknowledge' && inc.thread_id !== null && inc.phase === 'told') {
			await sendAckFollowup(trx, inc.thread_id, Date.now());
		}
	}

	/** The incident a new instance belongs to: the same one within the hold-off, else a new one. */
	async #attach(trx: Trx, alarm: AlarmTransition['alarm'], now: number): Promise<IncidentRow> {
		const { incident_holdoff_s } = await getSettings(trx, alarm.vessel_id);
		const previous = await trx
			.selectFrom('notify_incidents')
			.selectAll()
			.where('vessel_id', '=', alarm.vessel_id)
			.where((eb) =>
				alarm.shaft_id === null ? eb('shaft_id', 'is', null) : eb('shaft_id', '=', alarm.shaft_id)
			)
			.where('type', '=', alarm.type)
			.where('closed_at', 'is', null)
			.where('ended_at', 'is not', null)
			.orderBy('id', 'desc')
			.executeTakeFirst();
		// compared by time, not only by closed_at: the closing sweep may not have run yet
		if (previous && alarm.raised_at - previous.ended_at! <= incident_holdoff_s * 1000) {
			await trx
				.updateTable('notify_incidents')
				.set({ current_alarm_id: alarm.id, instances: previous.instances + 1, ended_at: null })
				.where('id', '=', previous.id)
				.execute();
			return {
				...previous,
				current_alarm_id: alarm.id,
				instances: previous.instances + 1,
				ended_at: null
			};
		}
		if (previous) {
			// past its hold-off: closed now rather than by the next sweep, so it cannot take this one
			await trx
				.updateTable('notify_incidents')
				.set({ closed_at: now })
				.where('id', '=', previous.id)
				.execute();
		}
		return trx
			.insertInto('notify_incidents')
			.values({
				vessel_id: alarm.vessel_id,
				shaft_id: alarm.shaft_id,
				type: alarm.type,
				priority: alarm.priority,
				first_alarm_id: alarm.id,
				current_alarm_id: alarm.id,
				opened_at: alarm.raised_at,
				phase: 'hidden',
				annunciated_at: null,
				due_at: null,
				thread_id: null,
				unacked_since: null,
				acknowledged_at: null,
				acknowledged_by: null,
				ack_comment: null,
				ended_at: null,
				closed_at: null
			})
			.returningAll()
			.executeTakeFirstOrThrow();
	}

	/** A margin warning while the same shaft has a low-flow incident says nothing new. */
	async #covered(trx: Trx, inc: IncidentRow): Promise<boolean> {
		const by = coveredBy(inc.type);
		if (!by || inc.shaft_id === null) return false;
		const open = await trx
			.selectFrom('notify_incidents')
			.select('id')
			.where('vessel_id', '=', inc.vessel_id)
			.where('shaft_id', '=', inc.shaft_id)
			.where('type', '=', by)
			.where('closed_at', 'is', null)
			.where('phase', 'in', ['pending', 'told'])
			.executeTakeFirst();
		return !!open;
	}
}

/**
 * When a newly shown alarm's first message is decided: with the vessel's open
 * batch if there is one, else after the hold (longer while the vessel floods).
 */
async function batchDue(trx: Trx, vesselId: number, now: number): Promise<number> {
	const open = await trx
		.selectFrom('notify_incidents')
		.select((eb) => eb.fn.max('due_at').as('due'))
		.where('vessel_id', '=', vesselId)
		.where('phase', '=', 'pending')
		.executeTakeFirst();
	if (open?.due !== null && open?.due !== undefined) return Number(open.due);
	const recent = await recentCount(trx, vesselId, now);
	return now + holdFor(recent);
}

/** Incidents shown on the vessel within the EEMUA rate window (covered ones are not told). */
export async function recentCount(trx: Trx, vesselId: number, now: number): Promise<number> {
	const row = await trx
		.selectFrom('notify_incidents')
		.select((eb) => eb.fn.countAll<number>().as('n'))
		.where('vessel_id', '=', vesselId)
		.where('phase', 'in', ['pending', 'told'])
		.where('annunciated_at', '>=', now - FLOOD_RATE_WINDOW_MS)
		.executeTakeFirst();
	return Number(row?.n ?? 0);
}
