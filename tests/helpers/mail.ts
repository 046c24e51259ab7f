/**
 * E-mail as it arrived: the in-process app's SMTP sink (what really went over SMTP) joined with
 * its outbox (why it was sent), so that a test counts messages where a recipient would.
 */
import type { AppContext } from '$lib/server/context';
import { waitFor } from './ports';

/** Messages that reached the sink for one recipient, oldest first, optionally of one kind. */
export function deliveredMail(ctx: AppContext, to: string, kind?: string) {
	return ctx.db
		.selectFrom('mail_sink')
		.innerJoin('mail_outbox', 'mail_outbox.message_id', 'mail_sink.message_id')
		.select([
			'mail_outbox.kind',
			'mail_outbox.thread_key',
			'mail_sink.message_id',
			'mail_sink.subject',
			'mail_sink.text',
			'mail_sink.in_reply_to',
			'mail_sink.references_header',
			'mail_sink.envelope_to'
		])
		.where('mail_outbox.to_address', '=', to)
		.$if(kind !== undefined, (q) => q.where('mail_outbox.kind', '=', kind!))
		.orderBy('mail_sink.id')
		.execute();
}

/**
 * Waits until at least `n` messages (of `kind`, and passing `match` on their text) reached `to`,
 * and returns them. Delivery is asynchronous, so this, not a count, is how to wait for one.
 */
export function waitForMail(
	ctx: AppContext,
	to: string,
	{ kind, n = 1, match }: { kind?: string; n?: number; match?: (text: string) => boolean } = {}
) {
	return waitFor(
		async () => {
			const rows = (await deliveredMail(ctx, to, kind)).filter(
				(r) => !match || match(r.text ?? '')
			);
			return rows.length >= n ? rows : null;
		},
		{ what: `${n} ${kind ?? 'messages'} to ${to}`, timeoutMs: 15_000 }
	);
}

/** Waits until everything queued so far has left the outbox, so that a count of messages is final. */
export async function outboxDrained(ctx: AppContext): Promise<void> {
	await waitFor(
		async () => {
			const row = await ctx.db
				.selectFrom('mail_outbox')
				.select((eb) => eb.fn.countAll<number>().as('n'))
				.where('status', 'in', ['queued', 'sending'])
				.executeTakeFirstOrThrow();
			return Number(row.n) === 0;
		},
		{ what: 'the outbox to drain' }
	);
}
