/**
 * The notification timer's pass, run every second (and by tests with a fixed
 * clock): decide the vessels' held batches, escalate what waited too long,
 * close incidents that stayed normal for the hold-off and send their
 * "returned to normal". Everything it acts on is in the database, so a restart
 * picks up where the last pass left off. Each decision is one transaction.
 */
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import type { IncidentRow } from '../db/tables/notify';
import { batchIsFlood, coveredBy } from './policy';
import { recentCount } from './incidents';
import { sendEscalation, sendNormalFollowup, tell } from './messages';
import { allSettings } from './settings';

type Db = Kysely<Database>;

export interface PassResult {
	told: number;
	escalated: number;
	closed: number;
}

export async function runPass(db: Db, now: number, log: (m: string) => void): Promise<PassResult> {
	const told = await decideBatches(db, now);
	const escalated = await escalate(db, now, log);
	const closed = await closeIncidents(db, now);
	return { told, escalated, closed };
}

/** Held first messages whose batch window has passed: one by one, or as a flood summary. */
async function decideBatches(db: Db, now: number): Promise<number> {
	const vessels = await db
		.selectFrom('notify_incidents')
		.select('vessel_id')
		.distinct()
		.where('phase', '=', 'pending')
		.where('due_at', '<=', now)
		.execute();
	let told = 0;
	for (const { vessel_id } of vessels) {
		told += await db.transaction().execute(async (trx) => {
			const pending = await trx
				.selectFrom('notify_incidents')
				.selectAll()
				.where('vessel_id', '=', vessel_id)
				.where('phase', '=', 'pending')
				.orderBy('annunciated_at')
				.orderBy('id')
				.execute();
			if (!pending.length) return 0;
			const { keep, covered } = await splitCovered(trx, vessel_id, pending);
			if (covered.length) {
				await trx
					.updateTable('notify_incidents')
					.set({ phase: 'covered', due_at: null })
					.where(
						'id',
						'in',
						covered.map((i) => i.id)
					)
					.execute();
			}
			if (!keep.length) return 0;
			const recent = await recentCount(trx, vessel_id, now);
			if (batchIsFlood(keep.length, recent)) {
				await tell(trx, vessel_id, keep, 'flood', now);
			} else {
				for (const inc of keep) await tell(trx, vessel_id, [inc], 'single', now);
			}
			return keep.length;
		});
	}
	return told;
}

/** Margin warnings of shafts that have a low-flow incident in the batch or already open. */
async function splitCovered(db: Db, vesselId: number, pending: IncidentRow[]) {
	const open = await db
		.selectFrom('notify_incidents')
		.select(['shaft_id', 'type'])
		.where('vessel_id', '=', vesselId)
		.where('closed_at', 'is', null)
		.where('phase', 'in', ['pending', 'told'])
		.execute();
	const keep: IncidentRow[] = [];
	const covered: IncidentRow[] = [];
	for (const inc of pending) {
		const by = coveredBy(inc.type);
		const hit =
			by && inc.shaft_id !== null && open.some((o) => o.type === by && o.shaft_id === inc.shaft_id);
		(hit ? covered : keep).push(inc);
	}
	return { keep, covered };
}

/**
 * An alarm-priority incident in view, active and unacknowledged for longer
 * than its vessel's escalation_after_s, whose thread was not escalated yet.
 * Only while active: a shaft that has its water back is not short of it,
 * whatever the acknowledgement (DESIGN.md §1, the fleet manager's job).
 */
async function escalate(db: Db, now: number, log: (m: string) => void): Promise<number> {
	const settings = await allSettings(db);
	const candidates = await db
		.selectFrom('notify_incidents')
		.innerJoin('notify_threads', 'notify_threads.id', 'notify_incidents.thread_id')
		.innerJoin('alarms', 'alarms.id', 'notify_incidents.current_alarm_id')
		.selectAll('notify_incidents')
		.where('notify_incidents.phase', '=', 'told')
		.where('notify_incidents.priority', '=', 'alarm')
		.where('notify_incidents.unacked_since', 'is not', null)
		.where('notify_incidents.closed_at', 'is', null)
		.where('notify_threads.escalated_at', 'is', null)
		.where('alarms.state', '=', 'unacknowledged')
		.execute();
	const due = candidates.filter(
		(i) => i.unacked_since! + settings(i.vessel_id).escalation_after_s * 1000 <= now
	);
	const byThread = new Map<number, IncidentRow[]>();
	for (const i of due) byThread.set(i.thread_id!, [...(byThread.get(i.thread_id!) ?? []), i]);
	let escalated = 0;
	for (const [threadId, incidents] of byThread) {
		const sent = await db.transaction().execute(async (trx) => {
			const thread = await trx
				.selectFrom('notify_threads')
				.select('escalated_at')
				.where('id', '=', threadId)
				.executeTakeFirst();
			if (!thread || thread.escalated_at !== null) return -1;
			// acknowledged since the candidates were read: judged again inside the transaction
			const still = await trx
				.selectFrom('notify_incidents')
				.innerJoin('alarms', 'alarms.id', 'notify_incidents.current_alarm_id')
				.selectAll('notify_incidents')
				.where(
					'notify_incidents.id',
					'in',
					incidents.map((i) => i.id)
				)
				.where('notify_incidents.unacked_since', 'is not', null)
				.where('alarms.state', '=', 'unacknowledged')
				.execute();
			if (!still.length) return -1;
			return sendEscalation(trx, threadId, still, now);
		});
		if (sent === 0) log(`thread ${threadId}: escalation due, but no fleet manager receives it`);
		if (sent >= 0) escalated++;
	}
	return escalated;
}

/** Incidents normal for their hold-off are closed; a thread whose incidents all closed says so. */
async function closeIncidents(db: Db, now: number): Promise<number> {
	const settings = await allSettings(db);
	const ended = await db
		.selectFrom('notify_incidents')
		.select(['id', 'vessel_id', 'ended_at', 'thread_id'])
		.where('closed_at', 'is', null)
		.where('ended_at', 'is not', null)
		.where('phase', '!=', 'pending')
		.execute();
	const closing = ended.filter(
		(i) => i.ended_at! + settings(i.vessel_id).incident_holdoff_s * 1000 <= now
	);
	if (!closing.length) return 0;
	const threads = new Set(closing.map((i) => i.thread_id).filter((t): t is number => t !== null));
	await db.transaction().execute(async (trx) => {
		await trx
			.updateTable('notify_incidents')
			.set({ closed_at: now })
			.where(
				'id',
				'in',
				closing.map((i) => i.id)
			)
			.where('ended_at', 'is not', null) // not re-raised since it was read
			.execute();
		for (const threadId of threads) {
			const open = await trx
				.selectFrom('notify_incidents')
				.select('id')
				.where('thread_id', '=', threadId)
				.where('closed_at', 'is', null)
				.executeTakeFirst();
			const thread = await trx
				.selectFrom('notify_threads')
				.select('closed_at')
				.where('id', '=', threadId)
				.executeTakeFirst();
			if (!open && thread && thread.closed_at === null)
				await sendNormalFollowup(trx, threadId, now);
		}
	});
	return closing.length;
}
