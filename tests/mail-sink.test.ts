/**
 * Mail through the embedded sink: a queued message leaves the outbox over
 * real SMTP and lands in mail_sink with its subject, both bodies and its
 * Message-ID; the admin views list and show it.
 */
import net from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApp, type TestApp } from './helpers/app';
import { waitFor } from './helpers/ports';
import { enqueueMail, threadHeaders } from '$lib/server/mail/outbox';
import { getSinkMessage, listSink, outboxOverview } from '$lib/server/mail/admin';

let app: TestApp;

beforeAll(async () => {
	app = await startTestApp();
});
afterAll(async () => {
	await app?.stop();
});

const sinkRowFor = (messageId: string) =>
	app.ctx.db.selectFrom('mail_sink').selectAll().where('message_id', '=', messageId).execute();

describe('the local sink', () => {
	it('runs on SMTP_PORT when SMTP_URL is unset', async () => {
		expect(app.ctx.services.mail?.via).toBe('sink');
		expect(app.ctx.services.mail?.sinkPort).toBe(app.smtpPort);
		const greeting = await new Promise<string>((resolve, reject) => {
			const socket = net.connect(app.smtpPort, '127.0.0.1');
			socket.once('data', (d) => {
				resolve(String(d));
				socket.end('QUIT\r\n');
			});
			socket.once('error', reject);
		});
		expect(greeting).toMatch(/^220 /);
	});

	it('receives a queued message with its subject, text, HTML and Message-ID', async () => {
		const { db } = app.ctx;
		const id = await db.transaction().execute((trx) =>
			enqueueMail(trx, {
				kind: 'password_reset',
				to: 'Bosun.Test@Example.org',
				subject: 'Sink check · ÆØÅ',
				text: 'Plain body\nsecond line',
				html: '<p>HTML <strong>body</strong></p>'
			})
		);
		const queued = await db
			.selectFrom('mail_outbox')
			.selectAll()
			.where('id', '=', id)
			.executeTakeFirstOrThrow();
		expect(queued.message_id).toMatch(/^<[0-9a-f-]{36}@localhost>$/);

		const sent = await waitFor(
			async () => {
				const row = await db
					.selectFrom('mail_outbox')
					.selectAll()
					.where('id', '=', id)
					.executeTakeFirstOrThrow();
				return row.status === 'sent' ? row : null;
			},
			{ what: 'the message to be sent' }
		);
		expect(sent.attempts).toBe(1);
		expect(sent.sent_at).toBeGreaterThan(0);

		const [got, ...more] = await sinkRowFor(queued.message_id);
		expect(more).toHaveLength(0);
		expect(got.subject).toBe('Sink check · ÆØÅ');
		expect(got.text?.trim()).toBe('Plain body\nsecond line');
		expect(got.html).toContain('<strong>body</strong>');
		expect(JSON.parse(got.envelope_to)).toEqual(['Bosun.Test@example.org']); // nodemailer lowercases the domain
		expect(got.envelope_from).toBe('aftwater@localhost');
		expect(got.raw_size).toBeGreaterThan(100);
	});

	it('threads the messages of one incident with In-Reply-To and References', async () => {
		const { db } = app.ctx;
		const to = 'chief@demo.test';
		const messageIdOf = async (id: number) =>
			(
				await db
					.selectFrom('mail_outbox')
					.select('message_id')
					.where('id', '=', id)
					.executeTakeFirstOrThrow()
			).message_id;
		const send = async (subject: string) => {
			const thread = await threadHeaders(db, 'alarm:test', to);
			const id = await enqueueMail(db, {
				kind: 'alarm_raised',
				to,
				subject,
				text: subject,
				html: `<p>${subject}</p>`,
				threadKey: 'alarm:test',
				...thread
			});
			return messageIdOf(id);
		};
		const first = await send('first');
		const second = await send('second');
		const third = await send('third\r\nBcc: someone@example.org');
		const [got] = await waitFor(async () => {
			const rows = await sinkRowFor(third);
			return rows.length ? rows : null;
		});
		expect(got.in_reply_to).toBe(second);
		expect(got.references_header).toBe(`${first} ${second}`);
		expect(got.subject).toBe('third Bcc: someone@example.org'); // a line break cannot add a header
		expect(JSON.parse(got.envelope_to)).toEqual([to]);
		const [reply] = await sinkRowFor(second);
		expect(reply.in_reply_to).toBe(first);
	});

	it('shows received mail to admins, newest first, and the outbox by state', async () => {
		const { db } = app.ctx;
		await app.ctx.services.mail!.deliverDue();
		const list = await listSink(db);
		expect(list.length).toBeGreaterThanOrEqual(3);
		expect(list[0].id).toBeGreaterThan(list[1].id);
		const one = await getSinkMessage(db, list[list.length - 1].id);
		expect(one?.subject).toBe('Sink check · ÆØÅ');
		expect(one?.envelope_to).toEqual(['Bosun.Test@example.org']); // nodemailer lowercases the domain
		const overview = await outboxOverview(db);
		expect(overview.counts.sent).toBeGreaterThanOrEqual(3);
		expect(overview.sent.every((m) => m.status === 'sent')).toBe(true);
		expect(overview.queued).toHaveLength(0);
	});

	it('does not send mail queued in a transaction that rolled back', async () => {
		const { db } = app.ctx;
		const before = await db
			.selectFrom('mail_outbox')
			.select((eb) => eb.fn.countAll<number>().as('n'))
			.executeTakeFirstOrThrow();
		await expect(
			db.transaction().execute(async (trx) => {
				await enqueueMail(trx, {
					kind: 'invitation',
					to: 'nobody@example.org',
					subject: 's',
					text: 't',
					html: 'h'
				});
				throw new Error('the cause failed');
			})
		).rejects.toThrow('the cause failed');
		await app.ctx.services.mail!.deliverDue();
		const after = await db
			.selectFrom('mail_outbox')
			.select((eb) => eb.fn.countAll<number>().as('n'))
			.executeTakeFirstOrThrow();
		expect(Number(after.n)).toBe(Number(before.n));
		expect(await listSink(db, { to: 'nobody@example.org' })).toHaveLength(0);
	});
});
