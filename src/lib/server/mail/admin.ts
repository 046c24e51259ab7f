/** What the admin mail page and its API show: the sink's messages and the outbox. */
import type { Kysely } from 'kysely';
import { ApiError } from '../api/errors';
import { audit, type Actor } from '../audit';
import type { AppContext } from '../context';
import type { Database } from '../db/schema';
import type { OutboxStatus, SinkRow } from '../db/tables/mail';
import type { MailService } from './index';
import { getOutboxMail, listOutbox, outboxCounts, retryMail } from './outbox';

export type SinkSummary = Omit<SinkRow, 'text' | 'html' | 'envelope_to'> & {
	envelope_to: string[];
};
export type SinkMessage = Omit<SinkRow, 'envelope_to'> & { envelope_to: string[] };

function recipients(json: string): string[] {
	try {
		const list = JSON.parse(json);
		return Array.isArray(list) ? list.map(String) : [];
	} catch {
		return [];
	}
}

/** Newest first. */
export async function listSink(
	db: Kysely<Database>,
	options: { limit?: number; to?: string } = {}
): Promise<SinkSummary[]> {
	const rows = await db
		.selectFrom('mail_sink')
		.select([
			'id',
			'envelope_from',
			'envelope_to',
			'header_from',
			'header_to',
			'subject',
			'message_id',
			'in_reply_to',
			'references_header',
			'raw_size',
			'received_at'
		])
		.$if(!!options.to, (q) =>
			// LIKE ignores ASCII case, as addresses' domains do
			q.where('envelope_to', 'like', `%${JSON.stringify(options.to!).slice(1, -1)}%`)
		)
		.orderBy('id', 'desc')
		.limit(options.limit ?? 100)
		.execute();
	return rows.map((r) => ({ ...r, envelope_to: recipients(r.envelope_to) }));
}

export async function getSinkMessage(
	db: Kysely<Database>,
	id: number
): Promise<SinkMessage | undefined> {
	const row = await db.selectFrom('mail_sink').selectAll().where('id', '=', id).executeTakeFirst();
	return row && { ...row, envelope_to: recipients(row.envelope_to) };
}

/** The outbox as admins read it: waiting, failed (with the error), and recently sent. */
export async function outboxOverview(db: Kysely<Database>, limit = 50) {
	const [counts, queued, sending, failed, sent] = await Promise.all([
		outboxCounts(db),
		listOutbox(db, { status: 'queued', limit }),
		listOutbox(db, { status: 'sending', limit }),
		listOutbox(db, { status: 'failed', limit }),
		listOutbox(db, { status: 'sent', limit })
	]);
	return { counts, queued: [...sending, ...queued], failed, sent };
}

export function transportInfo(mail: MailService | undefined) {
	return {
		via: mail?.via ?? null,
		destination: mail?.destination ?? 'mail is not running',
		sink_running: mail?.via === 'sink'
	};
}

export const OUTBOX_STATUSES = [
	'queued',
	'sending',
	'sent',
	'failed'
] as const satisfies readonly OutboxStatus[];

/** An administrator queues a failed message again (audited). */
export async function retryFailedMail(ctx: AppContext, actor: Actor, id: number): Promise<void> {
	const mail = await getOutboxMail(ctx.db, id);
	if (!mail) throw new ApiError(404, 'not_found', 'message not found');
	if (!(await retryMail(ctx.db, id))) {
		throw new ApiError(
			409,
			'conflict',
			`the message is ${mail.status}; only failed mail is retried`
		);
	}
	await audit(ctx.db, actor, {
		action: 'mail.retry',
		entity: 'mail',
		entityId: id,
		details: {
			to: mail.to_address,
			kind: mail.kind,
			attempts: mail.attempts,
			last_error: mail.last_error
		}
	});
}
