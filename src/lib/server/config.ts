/**
 * The one place that reads the environment. Every variable is documented in
 * README.md and .env.example; a bad value stops the server at start-up with a
 * message that names it, instead of failing later in some request.
 */
import { randomBytes } from 'node:crypto';
import { z } from 'zod';

const flag = z
	.enum(['1', '0', 'true', 'false', 'on', 'off', 'yes', 'no', ''])
	.transform((v) => ['1', 'true', 'on', 'yes'].includes(v));

const port = z.coerce.number().int().min(0).max(65_535);

const schema = z.object({
	ORIGIN: z.url().optional(),
	DATABASE_PATH: z.string().min(1).default('./data/aftwater.db'),
	DEMO: flag.default(false),
	DEMO_PASSWORD: z.string().min(8).default('aftwater-demo'),
	ADMIN_EMAIL: z.email().optional(),
	ADMIN_PASSWORD: z.string().min(12, 'ADMIN_PASSWORD must be at least 12 characters').optional(),

	MQTT_URL: z.url().optional(),
	MQTT_USERNAME: z.string().optional(),
	MQTT_PASSWORD: z.string().optional(),
	MQTT_PORT: port.default(1883),
	MQTT_HOST: z.string().default('0.0.0.0'),
	MQTT_TOPIC_PREFIX: z
		.string()
		.regex(/^[A-Za-z0-9_\-/]+[A-Za-z0-9_-]$/, 'a topic path without wildcards or a trailing /')
		.default('aftwater/v1'),
	/** Credential of the server's own MQTT.js subscriber on the embedded broker. */
	MQTT_INTERNAL_PASSWORD: z.string().min(16).optional(),

	SMTP_URL: z.string().optional(),
	SMTP_PORT: port.default(2525),
	MAIL_FROM: z.string().default('Aftwater <aftwater@localhost>'),

	SIMULATOR: z.enum(['on', 'off', '1', '0', 'auto']).default('auto'),
	/** evaluate alarm rules on ingest (off only to measure their cost in bench:ingest) */
	ALARM_RULES: flag.default(true),

	INGEST_FLUSH_MS: z.coerce.number().int().min(5).max(5_000).default(200),
	INGEST_BATCH_SIZE: z.coerce.number().int().min(1).max(50_000).default(5_000),
	RAW_RETENTION_DAYS: z.coerce.number().min(1).max(36_500).default(400),
	REJECTED_LOG_SIZE: z.coerce.number().int().min(10).max(100_000).default(500),
	/** Largest MQTT payload the ingest parses; anything bigger is rejected unread. */
	MAX_PAYLOAD_BYTES: z.coerce.number().int().min(256).max(1_048_576).default(4_096),
	/** How far ahead of the server's clock a sample's ts may be. */
	MAX_FUTURE_SKEW_S: z.coerce.number().int().min(0).max(86_400).default(300),

	/** First retry delay of an undelivered e-mail; each further attempt waits twice as long. */
	MAIL_RETRY_BASE_MS: z.coerce.number().int().min(1).max(3_600_000).default(5_000),
	/** Longest wait between two delivery attempts (10 min). */
	MAIL_RETRY_MAX_MS: z.coerce.number().int().min(1).max(86_400_000).default(600_000),
	/** Attempts before a message is marked failed (16 ≈ 1 h 30 min of retrying at the defaults). */
	MAIL_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(1_000).default(16),
	/** How often the delivery worker looks for due mail when nothing nudged it. */
	MAIL_POLL_MS: z.coerce.number().int().min(10).max(600_000).default(5_000),
	/** Largest message the local SMTP sink accepts (bytes). */
	MAIL_SINK_MAX_BYTES: z.coerce.number().int().min(1_024).max(52_428_800).default(10_485_760),
	/** Messages the local sink keeps; older ones are deleted as new ones arrive. */
	MAIL_SINK_KEEP: z.coerce.number().int().min(10).max(1_000_000).default(5_000)
});

export type Config = z.infer<typeof schema> & { mqttInternalPassword: string };

export function loadConfig(env: Record<string, string | undefined> = process.env): Config {
	// Treat empty strings as unset, as a shell `FOO= node …` means "not given".
	const cleaned = Object.fromEntries(
		Object.entries(env).filter(([, v]) => v !== undefined && v !== '')
	);
	const parsed = schema.safeParse(cleaned);
	if (!parsed.success) {
		const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
		throw new Error(`Aftwater configuration is invalid:\n${lines.join('\n')}`);
	}
	const config = parsed.data;
	return {
		...config,
		mqttInternalPassword: config.MQTT_INTERNAL_PASSWORD ?? randomBytes(24).toString('base64url')
	};
}

/** Whether the demo simulator should run with this configuration. */
export function simulatorWanted(config: Config): boolean {
	if (config.SIMULATOR === 'on' || config.SIMULATOR === '1') return true;
	if (config.SIMULATOR === 'off' || config.SIMULATOR === '0') return false;
	return config.DEMO;
}
