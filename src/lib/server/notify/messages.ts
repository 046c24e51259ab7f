/**
 * Queuing the messages of a thread: the first message (one alarm, or a flood
 * summary), the escalation to the fleet managers, and the follow-ups. Each
 * takes the caller's transaction, so a message and the record that it was sent
 * (notify_sends, the thread's *_at columns) are written together or not at all.
 */
import type { Kysely } from 'kysely';
import { ROLE_LABELS } from '$lib/types';
import type { Priority } from '$lib/alarms/types';
import { maybeContext } from '../context';
import type { Database } from '../db/schema';
import type { IncidentRow, ThreadKind } from '../db/tables/notify';
import { enqueueMail, mailEnv } from '../mail/outbox';
import { deliverableAt, wantsByEmail } from '../mail/preferences';
import { renderMail } from '../mail/templates';
import type { MailEnv, MailRequest } from '../mail/templates/types';
import { factsOf, loadContexts, type AlarmContext } from './facts';
import { topPriority } from './policy';
import { crewOf, fleetManagers, threadChain, threadRecipients, type Recipient } from './recipients';

type Db = Kysely<Database>;

function env(): MailEnv {
	return mailEnv({ ORIGIN: maybeContext()?.config.ORIGIN });
}

async function queue(
	db: Db,
	threadId: number,
	threadKey: string,
	to: Recipient,
	request: MailRequest,
	priority: Priority,
	reply: { inReplyTo: string | null; references: string[] } | null
): Promise<number> {
	// sent by the wall clock, whatever clock the pass judged by (tests judge ahead of it)
	const now = Date.now();
	const rendered = renderMail(request, env());
	const outboxId = await enqueueMail(db, {
		kind: request.kind,
		to: to.email,
		toUserId: to.id,
		...rendered,
		threadKey,
		inReplyTo: reply?.inReplyTo ?? null,
		references: reply?.references ?? [],
		// an alarm goes at once; a warning or caution waits for the end of a quiet period
		notBefore: deliverableAt(to.prefs, priority, now)
	});
	await db
		.insertInto('notify_sends')
		.values({
			thread_id: threadId,
			user_id: to.id,
			kind: request.kind,
			outbox_id: outboxId,
			at: now
		})
		.execute();
	return outboxId;
}

/** The incidents of a thread this recipient chose to hear of (all of them if none: they were told). */
function wanted(to: Recipient, contexts: AlarmContext[]): AlarmContext[] {
	const mine = contexts.filter((c) => wantsByEmail(to.prefs, to.role, c.alarm.priority));
	return mine.length ? mine : contexts;
}

async function threadIncidents(db: Db, threadId: number): Promise<IncidentRow[]> {
	return db
		.selectFrom('notify_incidents')
		.selectAll()
		.where('thread_id', '=', threadId)
		.orderBy('annunciated_at')
		.orderBy('id')
		.execute();
}

/**
 * Opens a thread for incidents decided together and e-mails the vessel's crew:
 * each the alarms of the priorities they chose, as one message per alarm, or
 * one flood summary when the thread is a flood and they get two or more.
 */
export async function tell(
	db: Db,
	vesselId: number,
	incidents: IncidentRow[],
	kind: ThreadKind,
	now: number
): Promise<number> {
	const thread = await db
		.insertInto('notify_threads')
		.values({
			vessel_id: vesselId,
			kind,
			// replaced by the stable key below once the id is known
			thread_key: `pending:${incidents[0].id}:${now}`,
			told_at: now,
			escalated_at: null,
			ack_told_at: null,
			normal_told_at: null,
			closed_at: null
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	const threadKey = `incident:${vesselId}:${thread.id}`;
	await db
		.updateTable('notify_threads')
		.set({ thread_key: threadKey })
		.where('id', '=', thread.id)
		.execute();
	await db
		.updateTable('notify_incidents')
		.set({ phase: 'told', thread_id: thread.id, due_at: null })
		.where(
			'id',
			'in',
			incidents.map((i) => i.id)
		)
		.execute();
	const told = incidents.map((i) => ({ ...i, phase: 'told' as const, thread_id: thread.id }));
	const contexts = await loadContexts(db, told);
	for (const to of await crewOf(db, vesselId)) {
		const mine = contexts.filter((c) => wantsByEmail(to.prefs, to.role, c.alarm.priority));
		if (!mine.length) continue;
		if (kind === 'flood' && mine.length >= 2) {
			const request: MailRequest = {
				kind: 'alarm_flood',
				data: {
					recipient: { name: to.name, units: to.prefs.units },
					alarms: mine.map((c) => factsOf(c, to.prefs.units, 'raised')),
					from: Math.min(...mine.map((c) => c.incident.annunciated_at ?? now)),
					to: Math.max(...mine.map((c) => c.incident.annunciated_at ?? now))
				}
			};
			const top = topPriority(mine.map((c) => c.alarm.priority));
			await queue(db, thread.id, threadKey, to, request, top, null);
		} else {
			for (const c of mine) {
				const request: MailRequest = {
					kind: 'alarm_raised',
					data: {
						recipient: { name: to.name, units: to.prefs.units },
						alarm: factsOf(c, to.prefs.units, 'raised')
					}
				};
				await queue(db, thread.id, threadKey, to, request, c.alarm.priority, null);
			}
		}
	}
	// acknowledged while its first message was held: the follow-up goes right behind it
	await sendAckFollowup(db, thread.id, now);
	return thread.id;
}

type Change = 'acknowledged' | 'returned_to_normal';

async function followup(db: Db, threadId: number, change: Change, now: number) {
	const thread = await db
		.selectFrom('notify_threads')
		.selectAll()
		.where('id', '=', threadId)
		.executeTakeFirstOrThrow();
	const contexts = await loadContexts(db, await threadIncidents(db, threadId));
	if (!contexts.length) return;
	const at =
		change === 'acknowledged'
			? Math.max(...contexts.map((c) => c.incident.acknowledged_at ?? now))
			: Math.max(...contexts.map((c) => c.incident.ended_at ?? now));
	for (const to of await threadRecipients(db, threadId)) {
		const mine = wanted(to, contexts);
		const reply = await threadChain(db, threadId, to.id);
		const recipient = { name: to.name, units: to.prefs.units };
		let request: MailRequest;
		if (thread.kind === 'flood' && mine.length >= 2) {
			request = {
				kind: 'alarm_flood',
				data: {
					recipient,
					alarms: mine.map((c) => factsOf(c, to.prefs.units, 'followup')),
					from: Math.min(...mine.map((c) => c.incident.annunciated_at ?? now)),
					to: Math.max(...mine.map((c) => c.incident.annunciated_at ?? now)),
					followup: { change, at }
				}
			};
		} else {
			const [c] = mine;
			request = {
				kind: 'alarm_followup',
				data: {
					recipient,
					alarm: factsOf(c, to.prefs.units, 'followup'),
					change,
					at:
						change === 'acknowledged'
							? (c.incident.acknowledged_at ?? at)
							: (c.incident.ended_at ?? at),
					by: change === 'acknowledged' ? c.incident.acknowledged_by : null,
					comment: change === 'acknowledged' ? c.incident.ack_comment : null,
					alreadyCleared: change === 'acknowledged' && c.incident.ended_at !== null
				}
			};
		}
		const top = topPriority(mine.map((c) => c.alarm.priority));
		await queue(db, threadId, thread.thread_key, to, request, top, reply);
	}
}

/**
 * "Acknowledged", once per thread, when every alarm in it is acknowledged
 * (or settled by the system); a re-raise within the incident sends no second one.
 */
export async function sendAckFollowup(db: Db, threadId: number, now: number): Promise<void> {
	const thread = await db
		.selectFrom('notify_threads')
		.select(['ack_told_at', 'normal_told_at'])
		.where('id', '=', threadId)
		.executeTakeFirst();
	if (!thread || thread.ack_told_at !== null || thread.normal_told_at !== null) return;
	const rows = await db
		.selectFrom('notify_incidents')
		.innerJoin('alarms', 'alarms.id', 'notify_incidents.current_alarm_id')
		.select(['alarms.acknowledged', 'notify_incidents.acknowledged_at'])
		.where('notify_incidents.thread_id', '=', threadId)
		.execute();
	// settled by the system alone (cleared while suppressed) is not an acknowledgement to report
	if (
		!rows.length ||
		rows.some((r) => !r.acknowledged) ||
		rows.every((r) => r.acknowledged_at === null)
	)
		return;
	await db
		.updateTable('notify_threads')
		.set({ ack_told_at: now })
		.where('id', '=', threadId)
		.execute();
	await followup(db, threadId, 'acknowledged', now);
}

/** "Returned to normal", once, when every incident of the thread has closed. */
export async function sendNormalFollowup(db: Db, threadId: number, now: number): Promise<void> {
	await db
		.updateTable('notify_threads')
		.set({ normal_told_at: now, closed_at: now })
		.where('id', '=', threadId)
		.execute();
	await followup(db, threadId, 'returned_to_normal', now);
}

/**
 * To the fleet managers: the thread's alarm nobody acknowledged in time, with
 * who was told and when. For a flood thread, the longest-waiting alarm, with a
 * note of how many more of the batch still wait.
 */
export async function sendEscalation(
	db: Db,
	threadId: number,
	due: IncidentRow[],
	now: number
): Promise<number> {
	const thread = await db
		.selectFrom('notify_threads')
		.selectAll()
		.where('id', '=', threadId)
		.executeTakeFirstOrThrow();
	await db
		.updateTable('notify_threads')
		.set({ escalated_at: now })
		.where('id', '=', threadId)
		.execute();
	const sorted = [...due].sort((a, b) => (a.unacked_since ?? now) - (b.unacked_since ?? now));
	const [context] = await loadContexts(db, sorted.slice(0, 1));
	if (!context) return 0;
	const told = await db
		.selectFrom('notify_sends')
		.innerJoin('users', 'users.id', 'notify_sends.user_id')
		.leftJoin('mail_outbox', 'mail_outbox.id', 'notify_sends.outbox_id')
		.select(['users.id', 'users.name', 'users.role', 'notify_sends.at', 'mail_outbox.sent_at'])
		.where('notify_sends.thread_id', '=', threadId)
		.where('notify_sends.kind', 'in', ['alarm_raised', 'alarm_flood'])
		.orderBy('notify_sends.id')
		.execute();
	const seen = new Set<string>();
	const notified = told
		.filter((t) => !seen.has(t.id) && seen.add(t.id))
		// when it reached the mail server if it has, else when it was queued
		.map((t) => ({ name: t.name, role: ROLE_LABELS[t.role], at: t.sent_at ?? t.at }));
	const others = due.length - 1;
	let sent = 0;
	for (const to of await fleetManagers(db)) {
		if (!wantsByEmail(to.prefs, to.role, 'alarm')) continue;
		const facts = factsOf(context, to.prefs.units, 'escalated');
		if (thread.kind === 'flood') {
			const waiting = others > 0 ? ` ${others} more of them are unacknowledged too.` : '';
			facts.note = [
				facts.note,
				`One of several alerts raised together on ${context.vessel.name}.${waiting}`
			]
				.filter(Boolean)
				.join(' ');
		}
		const request: MailRequest = {
			kind: 'alarm_escalated',
			data: {
				recipient: { name: to.name, units: to.prefs.units },
				alarm: facts,
				escalatedAt: now,
				notified
			}
		};
		await queue(
			db,
			threadId,
			thread.thread_key,
			to,
			request,
			'alarm',
			await threadChain(db, threadId, to.id)
		);
		sent++;
	}
	return sent;
}
