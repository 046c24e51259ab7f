/**
 * The SMTP transport: SMTP_URL when it is set (a hosted mail service),
 * otherwise the embedded sink on 127.0.0.1. Either way it is real SMTP, so
 * the worker cannot tell, and does not need to know, which one it talks to.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import type { Config } from '../config';

export type MailTransport = Transporter;

/** Short enough that an unreachable server does not hold the worker for minutes (ms). */
const TIMEOUTS = { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 60_000 };

export function createMailTransport(
	config: Pick<Config, 'SMTP_URL'>,
	sinkPort: number | null
): MailTransport {
	if (config.SMTP_URL) return nodemailer.createTransport({ url: config.SMTP_URL, ...TIMEOUTS });
	if (sinkPort === null) throw new Error('mail: no SMTP_URL and no local sink to send to');
	// The sink offers neither TLS nor AUTH: it only listens on the loopback interface.
	return nodemailer.createTransport({
		host: '127.0.0.1',
		port: sinkPort,
		secure: false,
		ignoreTLS: true,
		...TIMEOUTS
	});
}

/** Where mail goes, for logs and the admin page, without any password in SMTP_URL. */
export function describeTransport(
	config: Pick<Config, 'SMTP_URL'>,
	sinkPort: number | null
): string {
	if (!config.SMTP_URL) return `local sink smtp://127.0.0.1:${sinkPort}`;
	try {
		const url = new URL(config.SMTP_URL);
		url.username = '';
		url.password = '';
		url.search = '';
		return url.toString();
	} catch {
		return 'SMTP_URL';
	}
}
