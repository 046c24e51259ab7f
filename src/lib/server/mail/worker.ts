/**
 * The delivery worker: takes due rows from the outbox one at a time, sends
 * each with its stored Message-ID, and records the outcome.
 *
 * Once, even across restarts and outages: a row is claimed by one UPDATE that
 * moves it from 'queued' to 'sending', and only a successful send marks it
 * 'sent'. A crash between the server's acceptance and that mark leaves it
 * 'sending'; start-up puts it back in the queue, and the resend carries the
 * same Message-ID, so the receiving side can discard the copy.
 *
 * Retries back off exponentially (base, 2×base, 4×base … capped); after the
 * last attempt, or on a permanent refusal of the message itself (5xx to the
 * envelope or the data), the row is 'failed' with its last error for admins.
 */
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import type { OutboxRow } from '../db/tables/mail';
import type { MailTransport } from './transport';

export interface WorkerOptions {
	from: string;
	retryBaseMs: number;
	retryMaxMs: number;
	maxAttempts: number;
	pollMs: number;
	log?: (message: string) => void;
}

/** Wait before the next attempt, after `attempts` attempts have failed. */
export function backoffMs(attempts: number, baseMs: number, maxMs: number): number {
	const exponent = Math.min(Math.max(attempts - 1, 0), 40); // 2^40 × base is past any cap
	return Math.min(baseMs * 2 ** exponent, maxMs);
}

interface SmtpError {
	code?: string;
	responseCode?: number;
	message?: string;
}

/**
 * A refusal of this message (a 5xx to RCPT TO or to the data) will not change
 * on retry. Anything else (refused connection, timeout, 4xx, a 5xx greeting or
 * failed sign-in) is the server's state, and may pass: retry.
 */
export function isPermanent(err: unknown): boolean {
	const e = err as SmtpError;
	const code5xx =
		typeof e?.responseCode === 'number' && e.responseCode >= 500 && e.responseCode < 600;
	return code5xx && (e.code === 'EENVELOPE' || e.code === 'EMESSAGE');
}

function describe(err: unknown): string {
	const e = err as SmtpError;
	const parts = [e?.code, e?.responseCode, e?.message ?? String(err)].filter(
		(p) => p !== undefined && p !== ''
	);
	return parts.join(' ').slice(0, 1_000);
}

export class MailWorker {
	#timer: NodeJS.Timeout | undefined;
	#pass: Promise<number> | null = null;
	#nudged = false;
	#stopped = false;
	readonly #log: (message: string) => void;

	constructor(
		private readonly db: Kysely<Database>,
		private readonly transport: MailTransport,
		private readonly options: WorkerOptions
	) {
		this.#log = options.log ?? ((m) => console.warn(`[aftwater] mail: ${m}`));
	}

	async start(): Promise<void> {
		// A row still 'sending' was interrupted by a crash or a kill: send it again.
		const res = await this.db
			.updateTable('mail_outbox')
			.set({ status: 'queued', next_attempt_at: Date.now() })
			.where('status', '=', 'sending')
			.executeTakeFirst();
		const requeued = Number(res.numUpdatedRows);
		if (requeued) this.#log(`${requeued} message(s) interrupted while sending are queued again`);
		this.#arm(0);
	}

	/** Look for due mail now (called after an enqueue). */
	nudge(): void {
		if (this.#stopped) return;
		this.#nudged = true;
		this.#arm(0);
	}

	/** Delivers everything due now and resolves with how many were sent; never rejects. */
	async deliverDue(): Promise<number> {
		while (this.#pass) await this.#pass;
		this.#pass = this.#drain();
		try {
			return await this.#pass;
		} finally {
			this.#pass = null;
		}
	}

	async stop(): Promise<void> {
		this.#stopped = true;
		clearTimeout(this.#timer);
		// Let the message in flight finish; past the wait it stays 'sending' and start-up requeues it.
		if (this.#pass) {
			await Promise.race([this.#pass, new Promise((r) => setTimeout(r, 5_000).unref())]);
		}
		this.transport.close();
	}

	#arm(delayMs: number) {
		if (this.#stopped) return;
		clearTimeout(this.#timer);
		this.#timer = setTimeout(() => void this.#tick(), delayMs);
		this.#timer.unref?.();
	}

	async #tick() {
		this.#timer = undefined;
		if (this.#stopped) return;
		this.#nudged = false;
		await this.deliverDue();
		if (this.#stopped) return;
		this.#arm(this.#nudged ? 0 : await this.#nextDelay());
	}

	/** Until the earliest queued row is due, but never longer than the poll interval. */
	async #nextDelay(): Promise<number> {
		try {
			const next = await this.db
				.selectFrom('mail_outbox')
				.select((eb) => eb.fn.min('next_attempt_at').as('at'))
				.where('status', '=', 'queued')
				.executeTakeFirst();
			const at = next?.at === null || next?.at === undefined ? Infinity : Number(next.at);
			return Math.max(0, Math.min(this.options.pollMs, at - Date.now()));
		} catch {
			return this.options.pollMs;
		}
	}

	async #drain(): Promise<number> {
		let sent = 0;
		try {
			while (!this.#stopped) {
				const row = await this.#claim();
				if (!row) break;
				if (await this.#deliver(row)) sent++;
			}
		} catch (err) {
			// the database went away (shutdown) or is locked: the next tick tries again
			if (!this.#stopped) this.#log(`delivery pass stopped: ${describe(err)}`);
		}
		return sent;
	}

	/** Atomically takes the oldest due row; the attempt counts from here, even if we crash. */
	async #claim(): Promise<OutboxRow | undefined> {
		const now = Date.now();
		return this.db
			.updateTable('mail_outbox')
			.set((eb) => ({ status: 'sending', attempts: eb('attempts', '+', 1) }))
			.where('id', '=', (eb) =>
				eb
					.selectFrom('mail_outbox')
					.select('id')
					.where('status', '=', 'queued')
					.where('next_attempt_at', '<=', now)
					.orderBy('next_attempt_at')
					.orderBy('id')
					.limit(1)
			)
			.where('status', '=', 'queued')
			.returningAll()
			.executeTakeFirst();
	}

	async #deliver(row: OutboxRow): Promise<boolean> {
		try {
			await this.transport.sendMail({
				from: this.options.from,
				to: row.to_address,
				subject: row.subject,
				text: row.text,
				html: row.html,
				messageId: row.message_id,
				inReplyTo: row.in_reply_to ?? undefined,
				references: row.references_header ?? undefined,
				headers: { 'X-Aftwater-Kind': row.kind }
			});
		} catch (err) {
			const failed = isPermanent(err) || row.attempts >= this.options.maxAttempts;
			const error = describe(err);
			const retryIn = backoffMs(row.attempts, this.options.retryBaseMs, this.options.retryMaxMs);
			await this.db
				.updateTable('mail_outbox')
				.set({
					status: failed ? 'failed' : 'queued',
					next_attempt_at: failed ? Date.now() : Date.now() + retryIn,
					last_error: error
				})
				.where('id', '=', row.id)
				.execute();
			if (failed)
				this.#log(
					`message ${row.id} (${row.kind}) to ${row.to_address} failed after ${row.attempts} attempt(s): ${error}`
				);
			else if (row.attempts === 1)
				this.#log(`message ${row.id} not delivered yet, will retry: ${error}`);
			return false;
		}
		// Sent: from here on a failure must not lead to a resend while we run.
		await this.db
			.updateTable('mail_outbox')
			.set({ status: 'sent', sent_at: Date.now(), last_error: null })
			.where('id', '=', row.id)
			.execute();
		return true;
	}
}
