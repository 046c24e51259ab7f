/**
 * Mail as a long-lived part of the app: the local sink (only without
 * SMTP_URL), the transport and the delivery worker. Other concerns queue mail
 * with enqueueMail() (outbox.ts) and render it with renderMail() (templates).
 */
import type { AppContext } from '../context';
import type { Stoppable } from '../services';
import { startSink, type MailSink } from './sink';
import { createMailTransport, describeTransport } from './transport';
import { MailWorker } from './worker';

export interface MailService extends Stoppable {
	/** 'sink' when the embedded sink receives the mail, 'smtp' when SMTP_URL does */
	readonly via: 'sink' | 'smtp';
	/** the embedded sink's port; null when SMTP_URL is set (no sink runs) */
	readonly sinkPort: number | null;
	/** where mail goes, without credentials (for the admin page) */
	readonly destination: string;
	/** wake the worker now: due mail is sent without waiting for the next poll */
	nudge(): void;
	/** deliver everything due now; resolves with how many were sent */
	deliverDue(): Promise<number>;
	stop(): Promise<void>;
}

export async function startMail(ctx: AppContext): Promise<MailService> {
	const { config } = ctx;
	let sink: MailSink | null = null;
	if (!config.SMTP_URL) {
		sink = await startSink(ctx.db, {
			port: config.SMTP_PORT,
			maxBytes: config.MAIL_SINK_MAX_BYTES,
			keep: config.MAIL_SINK_KEEP
		});
	}
	const sinkPort = sink?.port ?? null;
	const worker = new MailWorker(ctx.db, createMailTransport(config, sinkPort), {
		from: config.MAIL_FROM,
		retryBaseMs: config.MAIL_RETRY_BASE_MS,
		retryMaxMs: config.MAIL_RETRY_MAX_MS,
		maxAttempts: config.MAIL_MAX_ATTEMPTS,
		pollMs: config.MAIL_POLL_MS
	});
	try {
		await worker.start();
	} catch (err) {
		await sink?.stop();
		throw err;
	}
	return {
		via: sink ? 'sink' : 'smtp',
		sinkPort,
		destination: describeTransport(config, sinkPort),
		nudge: () => worker.nudge(),
		deliverDue: () => worker.deliverDue(),
		async stop() {
			await worker.stop();
			await sink?.stop();
		}
	};
}

export { enqueueMail, threadHeaders, mailEnv, type OutgoingMail } from './outbox';
export { renderMail } from './templates';
