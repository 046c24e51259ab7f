/**
 * Mail: the outbox every message goes through, the local SMTP sink's store,
 * single-use account tokens (invitations, password resets) and each user's
 * notification preferences. Times are epoch milliseconds (INTEGER).
 * Frozen in time: never import application code here.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('mail_outbox')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('to_address', 'text', (c) => c.notNull())
		.addColumn('to_user_id', 'text', (c) => c.references('users.id').onDelete('set null'))
		.addColumn('subject', 'text', (c) => c.notNull())
		.addColumn('text', 'text', (c) => c.notNull())
		.addColumn('html', 'text', (c) => c.notNull())
		// Fixed when queued, so every retry carries the same Message-ID and a
		// receiver can drop a copy it already has (RFC 5322 §3.6.4).
		.addColumn('message_id', 'text', (c) => c.notNull().unique())
		.addColumn('in_reply_to', 'text')
		.addColumn('references_header', 'text')
		.addColumn('thread_key', 'text')
		.addColumn('status', 'text', (c) =>
			c
				.notNull()
				.defaultTo('queued')
				.check(sql`status in ('queued', 'sending', 'sent', 'failed')`)
		)
		.addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('next_attempt_at', 'integer', (c) => c.notNull())
		.addColumn('last_error', 'text')
		.addColumn('created_at', 'integer', (c) => c.notNull())
		.addColumn('sent_at', 'integer')
		.execute();
	await db.schema
		.createIndex('mail_outbox_due')
		.on('mail_outbox')
		.columns(['status', 'next_attempt_at'])
		.execute();
	await db.schema
		.createIndex('mail_outbox_created')
		.on('mail_outbox')
		.column('created_at')
		.execute();
	await db.schema
		.createIndex('mail_outbox_thread')
		.on('mail_outbox')
		.columns(['thread_key', 'to_address'])
		.execute();

	await db.schema
		.createTable('mail_sink')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('envelope_from', 'text')
		/** JSON array of the RCPT TO addresses */
		.addColumn('envelope_to', 'text', (c) => c.notNull())
		.addColumn('header_from', 'text')
		.addColumn('header_to', 'text')
		.addColumn('subject', 'text')
		.addColumn('text', 'text')
		.addColumn('html', 'text')
		.addColumn('message_id', 'text')
		.addColumn('in_reply_to', 'text')
		.addColumn('references_header', 'text')
		.addColumn('raw_size', 'integer', (c) => c.notNull())
		.addColumn('received_at', 'integer', (c) => c.notNull())
		.execute();
	await db.schema.createIndex('mail_sink_received').on('mail_sink').column('received_at').execute();
	await db.schema
		.createIndex('mail_sink_message_id')
		.on('mail_sink')
		.column('message_id')
		.execute();

	await db.schema
		.createTable('account_tokens')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('purpose', 'text', (c) => c.notNull().check(sql`purpose in ('invite', 'reset')`))
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		/** SHA-256 (hex) of the token; the token itself is only ever in the e-mail */
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('expires_at', 'integer', (c) => c.notNull())
		.addColumn('used_at', 'integer')
		.addColumn('created_at', 'integer', (c) => c.notNull())
		.execute();
	await db.schema
		.createIndex('account_tokens_user')
		.on('account_tokens')
		.columns(['user_id', 'purpose'])
		.execute();

	await db.schema
		.createTable('user_preferences')
		.addColumn('user_id', 'text', (c) => c.primaryKey().references('users.id').onDelete('cascade'))
		.addColumn('notify_alarm', 'integer', (c) =>
			c
				.notNull()
				.defaultTo(1)
				.check(sql`notify_alarm in (0, 1)`)
		)
		.addColumn('notify_warning', 'integer', (c) =>
			c
				.notNull()
				.defaultTo(1)
				.check(sql`notify_warning in (0, 1)`)
		)
		.addColumn('notify_caution', 'integer', (c) =>
			c
				.notNull()
				.defaultTo(0)
				.check(sql`notify_caution in (0, 1)`)
		)
		/** local hour of the daily digest; null = no digest */
		.addColumn('digest_hour', 'integer', (c) => c.check(sql`digest_hour between 0 and 23`))
		/** 'HH:MM' local; both null = no quiet period */
		.addColumn('quiet_from', 'text')
		.addColumn('quiet_to', 'text')
		/** IANA zone in which digest_hour and the quiet period are read */
		.addColumn('time_zone', 'text', (c) => c.notNull().defaultTo('UTC'))
		.addColumn('updated_at', 'integer', (c) => c.notNull())
		.addCheckConstraint(
			'user_preferences_quiet_pair',
			sql`(quiet_from is null) = (quiet_to is null)`
		)
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['user_preferences', 'account_tokens', 'mail_sink', 'mail_outbox']) {
		await db.schema.dropTable(t).execute();
	}
}
