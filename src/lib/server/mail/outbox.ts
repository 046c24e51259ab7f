/**
 * The outbox: every e-mail is first a row here, written in the same
 * transaction as whatever caused it (a user created, an alarm raised), so a
 * message is never lost to a crash and never sent for something rolled back.
 * The worker (worker.ts) delivers the rows.
 */
import { randomUUID } from 'node:crypto';
import { sql, type Kysely, type Transaction } from 'kysely';
import type { Config } from '../config';
import { maybeContext } from '../context';
import type { Database } from '../db/schema';
import type { OutboxRow, OutboxStatus } from '../db/tables/mail';
import type { MailEnv, MailKind } from './templates/types';

type Db = Kysely<Database> | Transaction<Database>;

export interface OutgoingMail {
	kind: MailKind;
	to: string;
	/** the user the address belongs to, when it is one */
	toUserId?: string | null;
	subject: string;
	text: string;
	html: string;
	/** Message-ID of the message this one answers (an alarm's first message) */
	inReplyTo?: string | null;
	/** Message-IDs of the thread so far, oldest first */
	references?: string[];
	/** groups the messages of one incident for threading, e.g. `alarm:42` */
	threadKey?: string | null;
	/** earliest delivery (epoch ms), e.g. the end of a quiet period; now when left out */
	notBefore?: number;
}

/** The domain of MAIL_FROM's address: Message-IDs are made in a domain the sender uses. */
export function messageIdDomain(from: string | undefined): string {
	const address = from?.match(/<([^>]+)>/)?.[1] ?? from ?? '';
	const domain = address.split('@')[1]?.trim().toLowerCase();
	return domain && /^[a-z0-9.-]+$/.test(domain) ? domain : 'aftwater.localhost';
}

/** A new globally unique Message-ID, angle brackets included (RFC 5322 §3.6.4). */
export function newMessageId(domain: string): string {
	return `<${randomUUID()}@${domain}>`;
}

/** Links in mail start with ORIGIN (no trailing slash). */
export function mailEnv(config: Pick<Config, 'ORIGIN'>): MailEnv {
	return { origin: (config.ORIGIN ?? 'http://localhost:3000').replace(/\/+$/, '') };
}

/**
 * Queues a message; pass the caller's transaction to make the message part of
 * it. Returns the outbox id. The worker is nudged at once; it reads the row
 * when the transaction has committed (one SQLite connection serialises them).
 */
export async function enqueueMail(db: Db, message: OutgoingMail): Promise<number> {
	const now = Date.now();
	const ctx = maybeContext();
	const row = await db
		.insertInto('mail_outbox')
		.values({
			kind: message.kind,
			to_address: message.to.trim(),
			to_user_id: message.toUserId ?? null,
			// a line break in a name must not start a new header
			subject: message.subject.replace(/[\r\n]+/g, ' '),
			text: message.text,
			html: message.html,
			message_id: newMessageId(messageIdDomain(ctx?.config.MAIL_FROM)),
			in_reply_to: message.inReplyTo ?? null,
			references_header: message.references?.length ? message.references.join(' ') : null,
			thread_key: message.threadKey ?? null,
			status: 'queued',
			attempts: 0,
			next_attempt_at: Math.max(now, message.notBefore ?? now),
			last_error: null,
			created_at: now,
			sent_at: null
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	ctx?.services.mail?.nudge();
	return row.id;
}

/**
 * In-Reply-To and References for the next message of a thread to one
 * recipient: the thread's earlier messages to that address, oldest first.
 */
export async function threadHeaders(db: Db, threadKey: string, to: string) {
	const earlier = await db
		.selectFrom('mail_outbox')
		.select('message_id')
		.where('thread_key', '=', threadKey)
		.where('to_address', '=', to.trim())
		.orderBy('id')
		.execute();
	const ids = earlier.map((r) => r.message_id);
	// the parent is the latest earlier message; References carries the whole chain (RFC 5322 §3.6.4)
	return { inReplyTo: ids.at(-1) ?? null, references: ids };
}

// ---- what administrators see ----

export type OutboxSummary = Omit<OutboxRow, 'text' | 'html'>;

const SUMMARY_COLUMNS = [
	'id',
	'kind',
	'to_address',
	'to_user_id',
	'subject',
	'message_id',
	'in_reply_to',
	'references_header',
	'thread_key',
	'status',
	'attempts',
	'next_attempt_at',
	'last_error',
	'created_at',
	'sent_at'
] as const;

export async function listOutbox(
	db: Db,
	options: { status?: OutboxStatus; limit?: number } = {}
): Promise<OutboxSummary[]> {
	return db
		.selectFrom('mail_outbox')
		.select(SUMMARY_COLUMNS)
		.$if(options.status !== undefined, (q) => q.where('status', '=', options.status!))
		.orderBy('id', 'desc')
		.limit(options.limit ?? 100)
		.execute();
}

export async function outboxCounts(db: Db): Promise<Record<OutboxStatus, number>> {
	const rows = await db
		.selectFrom('mail_outbox')
		.select(['status', sql<number>`count(*)`.as('n')])
		.groupBy('status')
		.execute();
	const counts: Record<OutboxStatus, number> = { queued: 0, sending: 0, sent: 0, failed: 0 };
	for (const r of rows) counts[r.status] = Number(r.n);
	return counts;
}

export async function getOutboxMail(db: Db, id: number) {
	return db.selectFrom('mail_outbox').selectAll().where('id', '=', id).executeTakeFirst();
}

/** Puts a failed message back in the queue for a fresh set of attempts. */
export async function retryMail(db: Db, id: number): Promise<boolean> {
	const res = await db
		.updateTable('mail_outbox')
		.set({ status: 'queued', attempts: 0, next_attempt_at: Date.now() })
		.where('id', '=', id)
		.where('status', '=', 'failed')
		.executeTakeFirst();
	const done = Number(res.numUpdatedRows) > 0;
	if (done) maybeContext()?.services.mail?.nudge();
	return done;
}
