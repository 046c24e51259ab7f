/**
 * The local SMTP sink: stands in for a hosted mail service in development,
 * demos and tests. It accepts every message on 127.0.0.1 (no TLS, no AUTH),
 * keeps it in mail_sink for the admin mail page, and delivers nothing onward.
 * Started only when SMTP_URL is unset.
 */
import type { Kysely } from 'kysely';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { AddressInfo } from 'node:net';
import type { Database } from '../db/schema';

export interface SinkOptions {
	port: number;
	/** bytes; larger messages are refused with 552 (RFC 5321 §4.5.3.1.10) */
	maxBytes: number;
	/** rows kept; older ones go as new ones arrive */
	keep: number;
}

export interface MailSink {
	port: number;
	stop(): Promise<void>;
}

function smtpError(code: number, message: string): Error {
	return Object.assign(new Error(message), { responseCode: code });
}

function addressText(a: AddressObject | AddressObject[] | undefined): string | null {
	if (!a) return null;
	return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ') || null;
}

async function store(
	db: Kysely<Database>,
	raw: Buffer,
	envelope: { from: string | null; to: string[] },
	keep: number
) {
	const mail = await simpleParser(raw, {
		skipTextToHtml: true,
		skipImageLinks: true,
		skipTextLinks: true
	});
	const refs = mail.references === undefined ? null : [mail.references].flat().join(' ');
	const { id } = await db
		.insertInto('mail_sink')
		.values({
			envelope_from: envelope.from,
			envelope_to: JSON.stringify(envelope.to),
			header_from: addressText(mail.from),
			header_to: addressText(mail.to),
			subject: mail.subject ?? null,
			text: mail.text ?? null,
			html: mail.html === false ? null : (mail.html ?? null),
			message_id: mail.messageId ?? null,
			in_reply_to: mail.inReplyTo ?? null,
			references_header: refs,
			raw_size: raw.length,
			received_at: Date.now()
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	if (id > keep)
		await db
			.deleteFrom('mail_sink')
			.where('id', '<=', id - keep)
			.execute();
	return id;
}

export async function startSink(db: Kysely<Database>, options: SinkOptions): Promise<MailSink> {
	const server = new SMTPServer({
		banner: 'Aftwater local mail sink',
		secure: false,
		disabledCommands: ['AUTH', 'STARTTLS'],
		authOptional: true,
		size: options.maxBytes,
		logger: false,
		closeTimeout: 5_000, // ms: a stuck client must not hold shutdown for the default 30 s
		onData(stream, session, callback) {
			const chunks: Buffer[] = [];
			let size = 0;
			stream.on('data', (chunk: Buffer) => {
				size += chunk.length;
				if (size <= options.maxBytes) chunks.push(chunk);
			});
			stream.on('error', (err) => callback(err));
			stream.on('end', () => {
				if (stream.sizeExceeded) {
					callback(smtpError(552, `message exceeds the sink's limit of ${options.maxBytes} bytes`));
					return;
				}
				const envelope = {
					from: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
					to: session.envelope.rcptTo.map((r) => r.address)
				};
				store(db, Buffer.concat(chunks), envelope, options.keep).then(
					(id) => callback(null, `stored as ${id}`),
					(err) => {
						console.error('[aftwater] mail sink: could not store a message:', err);
						callback(smtpError(451, 'the sink could not store the message; try again later'));
					}
				);
			});
		}
	});
	// smtp-server emits client socket errors here; unheard, they would crash the process
	server.on('error', (err) => console.error('[aftwater] mail sink:', err.message));

	await new Promise<void>((resolve, reject) => {
		const onError = (err: Error) =>
			reject(
				new Error(`mail sink could not listen on 127.0.0.1:${options.port}: ${err.message}`, {
					cause: err
				})
			);
		server.server.once('error', onError);
		server.listen(options.port, '127.0.0.1', () => {
			server.server.off('error', onError);
			resolve();
		});
	});
	const port = (server.server.address() as AddressInfo).port;

	return {
		port,
		stop: () => new Promise<void>((resolve) => server.close(() => resolve()))
	};
}
