/** Tables of the mail concern (created by migrations/20261201_0004_mail.ts). */
import type { ColumnType, Generated, Insertable, Selectable } from 'kysely';

type EpochMs = number;

export type OutboxStatus = 'queued' | 'sending' | 'sent' | 'failed';

export interface MailOutboxTable {
	id: Generated<number>;
	/** the template kind ('invitation', 'password_reset', 'alarm_raised', …) */
	kind: string;
	to_address: string;
	to_user_id: string | null;
	subject: string;
	text: string;
	html: string;
	/** '<…@…>', fixed at enqueue so retries can be de-duplicated by the receiver */
	message_id: string;
	in_reply_to: string | null;
	/** space-separated Message-IDs, as in the References header */
	references_header: string | null;
	/** groups the messages of one incident (an alarm's thread) */
	thread_key: string | null;
	status: ColumnType<OutboxStatus, OutboxStatus | undefined, OutboxStatus>;
	attempts: ColumnType<number, number | undefined, number>;
	next_attempt_at: EpochMs;
	last_error: string | null;
	created_at: EpochMs;
	sent_at: EpochMs | null;
}

export interface MailSinkTable {
	id: Generated<number>;
	envelope_from: string | null;
	/** JSON array of RCPT TO addresses */
	envelope_to: string;
	header_from: string | null;
	header_to: string | null;
	subject: string | null;
	text: string | null;
	html: string | null;
	message_id: string | null;
	in_reply_to: string | null;
	references_header: string | null;
	raw_size: number;
	received_at: EpochMs;
}

export type AccountTokenPurpose = 'invite' | 'reset';

export interface AccountTokensTable {
	id: Generated<number>;
	purpose: AccountTokenPurpose;
	user_id: string;
	/** SHA-256 hex of the token */
	token_hash: string;
	expires_at: EpochMs;
	used_at: EpochMs | null;
	created_at: EpochMs;
}

/** SQLite booleans: 0 or 1 */
type Flag = ColumnType<number, number | undefined, number>;

export interface UserPreferencesTable {
	user_id: string;
	notify_alarm: Flag;
	notify_warning: Flag;
	notify_caution: Flag;
	digest_hour: number | null;
	quiet_from: string | null;
	quiet_to: string | null;
	time_zone: ColumnType<string, string | undefined, string>;
	updated_at: EpochMs;
}

export interface MailTables {
	mail_outbox: MailOutboxTable;
	mail_sink: MailSinkTable;
	account_tokens: AccountTokensTable;
	user_preferences: UserPreferencesTable;
}

export type OutboxRow = Selectable<MailOutboxTable>;
export type NewOutboxRow = Insertable<MailOutboxTable>;
export type SinkRow = Selectable<MailSinkTable>;
export type AccountTokenRow = Selectable<AccountTokensTable>;
export type UserPreferencesRow = Selectable<UserPreferencesTable>;
