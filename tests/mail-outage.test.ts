/**
 * Delivery through SMTP_URL to an SMTP server of the test's own (smtp-server
 * on a free port), which can be down, busy (421) or refuse a recipient (550).
 * Messages are counted by Message-ID at that server: each exactly once,
 * through outages and restarts. Back-off is shortened by configuration so the
 * retries come quickly; nothing here measures time.
 */
import net from 'node:net';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApp, type TestApp } from './helpers/app';
import { freePort, waitFor } from './helpers/ports';
import { enqueueMail, retryMail } from '$lib/server/mail/outbox';
import { outboxOverview } from '$lib/server/mail/admin';

interface Received {
	messageId: string;
	to: string[];
	subject: string;
}

/** A stand-in for a hosted mail service that the test can take down and bring back. */
class TestSmtp {
	received: Received[] = [];
	/** 'busy' answers every connection with 421, as a server under maintenance does */
	mode: 'accept' | 'busy' = 'accept';
	rejected = new Set<string>();
	#server: SMTPServer | null = null;
	constructor(readonly port: number) {}

	get url() {
		return `smtp://127.0.0.1:${this.port}`;
	}

	count(messageId: string) {
		return this.received.filter((r) => r.messageId === messageId).length;
	}

	async up() {
		const server = new SMTPServer({
			disabledCommands: ['AUTH', 'STARTTLS'],
			authOptional: true,
			logger: false,
			onConnect: (_session, callback) => {
				if (this.mode === 'busy') {
					callback(
						Object.assign(new Error('service not available, try later'), { responseCode: 421 })
					);
				} else callback();
			},
			onRcptTo: (address, _session, callback) => {
				if (this.rejected.has(address.address)) {
					callback(Object.assign(new Error('no such mailbox'), { responseCode: 550 }));
				} else callback();
			},
			onData: (stream, session, callback) => {
				simpleParser(stream).then(
					(mail) => {
						this.received.push({
							messageId: mail.messageId ?? '',
							to: session.envelope.rcptTo.map((r) => r.address),
							subject: mail.subject ?? ''
						});
						callback();
					},
					(err) => callback(err)
				);
			}
		});
		server.on('error', () => {});
		await new Promise<void>((resolve, reject) => {
			server.server.once('error', reject);
			server.listen(this.port, '127.0.0.1', () => resolve());
		});
		this.#server = server;
	}

	async down() {
		const server = this.#server;
		this.#server = null;
		if (server) await new Promise<void>((resolve) => server.close(() => resolve()));
	}
}

/** Retries every few tens of ms (instead of seconds) so outages pass quickly. */
const FAST = { MAIL_RETRY_BASE_MS: '20', MAIL_RETRY_MAX_MS: '150', MAIL_POLL_MS: '50' };

function refusesConnections(port: number): Promise<boolean> {
	return new Promise((resolve) => {
		const socket = net.connect(port, '127.0.0.1');
		socket.once('connect', () => {
			socket.destroy();
			resolve(false);
		});
		socket.once('error', () => resolve(true));
	});
}

async function queue(app: TestApp, n: number, tag: string) {
	const ids: number[] = [];
	for (let i = 0; i < n; i++) {
		ids.push(
			await enqueueMail(app.ctx.db, {
				kind: 'alarm_raised',
				to: `engineer${i}@example.org`,
				subject: `${tag} ${i}`,
				text: `message ${i}`,
				html: `<p>message ${i}</p>`
			})
		);
	}
	return ids;
}

async function rows(app: TestApp, ids: number[]) {
	return app.ctx.db
		.selectFrom('mail_outbox')
		.selectAll()
		.where('id', 'in', ids)
		.orderBy('id')
		.execute();
}

describe('SMTP_URL set', () => {
	let smtp: TestSmtp;
	let app: TestApp;

	beforeAll(async () => {
		smtp = new TestSmtp(await freePort());
		await smtp.up();
		app = await startTestApp({ SMTP_URL: smtp.url, MAIL_MAX_ATTEMPTS: '1000', ...FAST });
	});
	afterAll(async () => {
		await app?.stop();
		await smtp?.down();
	});

	it('sends through that server and starts no sink', async () => {
		const mail = app.ctx.services.mail!;
		expect(mail.via).toBe('smtp');
		expect(mail.sinkPort).toBeNull();
		expect(await refusesConnections(app.smtpPort)).toBe(true);

		const [id] = await queue(app, 1, 'via SMTP_URL');
		const [row] = await waitFor(async () => {
			const r = await rows(app, [id]);
			return r[0].status === 'sent' ? r : null;
		});
		expect(smtp.count(row.message_id)).toBe(1);
		expect(smtp.received.find((r) => r.messageId === row.message_id)?.subject).toBe(
			'via SMTP_URL 0'
		);
		const sink = await app.ctx.db.selectFrom('mail_sink').select('id').execute();
		expect(sink).toHaveLength(0);
	});

	it('delivers each message exactly once after the server was down, then busy, then back', async () => {
		await smtp.down();
		const ids = await queue(app, 5, 'outage');

		// Down: connections refused, every message retried with back-off, none lost.
		const down = await waitFor(
			async () => {
				const r = await rows(app, ids);
				return r.every((m) => m.attempts >= 2) ? r : null;
			},
			{ what: 'two refused attempts per message' }
		);
		for (const m of down) {
			expect(m.status === 'queued' || m.status === 'sending').toBe(true);
			expect(m.sent_at).toBeNull();
		}
		expect(down.some((m) => /ECONNREFUSED/.test(m.last_error ?? ''))).toBe(true);

		// Up but busy: the server answers 421, which is worth retrying.
		smtp.mode = 'busy';
		await smtp.up();
		await waitFor(async () => (await rows(app, ids)).some((m) => /421/.test(m.last_error ?? '')), {
			what: 'a 421 answer to be recorded'
		});
		expect(smtp.received.filter((r) => r.subject.startsWith('outage'))).toHaveLength(0);

		// Back: everything goes, once.
		smtp.mode = 'accept';
		const sent = await waitFor(
			async () => {
				const r = await rows(app, ids);
				return r.every((m) => m.status === 'sent') ? r : null;
			},
			{ what: 'all messages to be sent' }
		);
		await app.ctx.services.mail!.deliverDue();
		for (const m of sent) {
			expect(smtp.count(m.message_id)).toBe(1);
			expect(m.last_error).toBeNull();
		}
		expect(smtp.received.filter((r) => r.subject.startsWith('outage'))).toHaveLength(5);
	});

	it('fails a message whose recipient the server refuses (550) at once, shows why, and can retry it', async () => {
		smtp.rejected.add('gone@example.org');
		const id = await enqueueMail(app.ctx.db, {
			kind: 'password_reset',
			to: 'gone@example.org',
			subject: 'refused',
			text: 't',
			html: '<p>t</p>'
		});
		const [failed] = await waitFor(async () => {
			const r = await rows(app, [id]);
			return r[0].status === 'failed' ? r : null;
		});
		expect(failed.attempts).toBe(1);
		expect(failed.last_error).toMatch(/550/);
		const overview = await outboxOverview(app.ctx.db);
		expect(overview.failed.map((m) => m.id)).toContain(id);
		expect(overview.failed.find((m) => m.id === id)?.last_error).toMatch(/no such mailbox/);

		smtp.rejected.delete('gone@example.org');
		expect(await retryMail(app.ctx.db, id)).toBe(true);
		const [sent] = await waitFor(async () => {
			const r = await rows(app, [id]);
			return r[0].status === 'sent' ? r : null;
		});
		expect(smtp.count(sent.message_id)).toBe(1);
		expect(await retryMail(app.ctx.db, id)).toBe(false); // only failed mail is retried
	});
});

describe('giving up', () => {
	let app: TestApp;
	let port: number;

	beforeAll(async () => {
		port = await freePort(); // nothing ever listens here
		app = await startTestApp({
			SMTP_URL: `smtp://127.0.0.1:${port}`,
			MAIL_MAX_ATTEMPTS: '3',
			...FAST
		});
	});
	afterAll(async () => {
		await app?.stop();
	});

	it('marks a message failed after MAIL_MAX_ATTEMPTS, with the last error', async () => {
		const [id] = await queue(app, 1, 'never');
		const [row] = await waitFor(async () => {
			const r = await rows(app, [id]);
			return r[0].status === 'failed' ? r : null;
		});
		expect(row.attempts).toBe(3);
		expect(row.last_error).toMatch(/ECONNREFUSED/);
		expect(row.sent_at).toBeNull();
	});
});

describe('restarts', () => {
	let smtp: TestSmtp;
	let dir: string;
	let app: TestApp | undefined;

	beforeAll(async () => {
		smtp = new TestSmtp(await freePort());
		dir = mkdtempSync(join(tmpdir(), 'aftwater-mail-restart-'));
	});
	afterAll(async () => {
		await app?.stop();
		await smtp?.down();
		rmSync(dir, { recursive: true, force: true });
	});

	it('delivers queued and interrupted mail once after a restart, and never resends sent mail', async () => {
		const env = {
			SMTP_URL: smtp.url,
			DATABASE_PATH: join(dir, 'aftwater.db'),
			MAIL_MAX_ATTEMPTS: '1000',
			...FAST
		};
		await smtp.up();
		app = await startTestApp(env);
		const [early] = await queue(app, 1, 'before');
		const [earlyRow] = await waitFor(async () => {
			const r = await rows(app!, [early]);
			return r[0].status === 'sent' ? r : null;
		});

		await smtp.down();
		const ids = await queue(app, 3, 'across restart');
		await waitFor(async () => (await rows(app!, ids)).every((m) => m.attempts >= 1), {
			what: 'a failed attempt each'
		});
		await app.stop();
		app = undefined;

		// As if the server had died in the middle of a send: that row is left 'sending'.
		const sqlite = new Database(env.DATABASE_PATH);
		sqlite.prepare(`update mail_outbox set status = 'sending' where id = ?`).run(ids[0]);
		const left = sqlite.prepare(`select status, count(*) n from mail_outbox group by status`).all();
		sqlite.close();
		expect(left).toContainEqual({ status: 'sending', n: 1 });

		await smtp.up();
		app = await startTestApp(env);
		const sent = await waitFor(
			async () => {
				const r = await rows(app!, ids);
				return r.every((m) => m.status === 'sent') ? r : null;
			},
			{ what: 'the queued mail to go out after the restart' }
		);
		await app.ctx.services.mail!.deliverDue();
		for (const m of sent) expect(smtp.count(m.message_id)).toBe(1);
		expect(smtp.count(earlyRow.message_id)).toBe(1);
		expect(smtp.received).toHaveLength(4);
	});
});
