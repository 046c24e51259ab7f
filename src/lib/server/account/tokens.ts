/**
 * Single-use account tokens: invitations (set a first password) and password
 * resets. The token is 32 random bytes, sent only in the e-mail; the database
 * keeps its SHA-256, so a leaked database opens no account. A full-entropy
 * token needs no slow hash (the same reasoning as auth/tokens.ts).
 */
import { createHash, randomBytes } from 'node:crypto';
import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/schema';
import type { AccountTokenPurpose } from '../db/tables/mail';

type Db = Kysely<Database> | Transaction<Database>;

export const TOKEN_TTL_MS: Record<AccountTokenPurpose, number> = {
	invite: 7 * 24 * 3_600_000, // 7 days: time to find the e-mail after a leave at sea
	reset: 3_600_000 // 1 hour
};

/** 32 bytes in base64url: 43 characters */
const TOKEN_SHAPE = /^[A-Za-z0-9_-]{43}$/;

export const hashAccountToken = (token: string) => createHash('sha256').update(token).digest('hex');

export type TokenState = 'valid' | 'used' | 'expired' | 'unknown';

/**
 * A new token for the user; any earlier unused token of the same purpose
 * stops working, so only the newest e-mail's link does.
 */
export async function issueAccountToken(
	db: Db,
	purpose: AccountTokenPurpose,
	userId: string,
	now = Date.now()
): Promise<{ token: string; expiresAt: number }> {
	const token = randomBytes(32).toString('base64url');
	const expiresAt = now + TOKEN_TTL_MS[purpose];
	await db
		.updateTable('account_tokens')
		.set({ expires_at: now })
		.where('user_id', '=', userId)
		.where('purpose', '=', purpose)
		.where('used_at', 'is', null)
		.where('expires_at', '>', now)
		.execute();
	await db
		.insertInto('account_tokens')
		.values({
			purpose,
			user_id: userId,
			token_hash: hashAccountToken(token),
			expires_at: expiresAt,
			used_at: null,
			created_at: now
		})
		.execute();
	return { token, expiresAt };
}

/** What a link's token is now, without using it (for the page that shows the form). */
export async function inspectAccountToken(
	db: Db,
	purpose: AccountTokenPurpose,
	token: string,
	now = Date.now()
): Promise<{ state: TokenState; userId: string | null }> {
	if (!TOKEN_SHAPE.test(token)) return { state: 'unknown', userId: null };
	const row = await db
		.selectFrom('account_tokens')
		.select(['user_id', 'expires_at', 'used_at'])
		.where('token_hash', '=', hashAccountToken(token))
		.where('purpose', '=', purpose)
		.executeTakeFirst();
	if (!row) return { state: 'unknown', userId: null };
	if (row.used_at !== null) return { state: 'used', userId: row.user_id };
	if (row.expires_at <= now) return { state: 'expired', userId: row.user_id };
	return { state: 'valid', userId: row.user_id };
}

/**
 * Uses the token: one UPDATE that only a live, unused token passes, so two
 * requests racing with the same link cannot both succeed. On success every
 * other open token of the user (either purpose) is closed too.
 */
export async function consumeAccountToken(
	db: Db,
	purpose: AccountTokenPurpose,
	token: string,
	now = Date.now()
): Promise<{ ok: true; userId: string } | { ok: false; state: Exclude<TokenState, 'valid'> }> {
	if (!TOKEN_SHAPE.test(token)) return { ok: false, state: 'unknown' };
	const row = await db
		.updateTable('account_tokens')
		.set({ used_at: now })
		.where('token_hash', '=', hashAccountToken(token))
		.where('purpose', '=', purpose)
		.where('used_at', 'is', null)
		.where('expires_at', '>', now)
		.returning(['id', 'user_id'])
		.executeTakeFirst();
	if (!row) {
		const { state } = await inspectAccountToken(db, purpose, token, now);
		return { ok: false, state: state === 'valid' ? 'used' : state };
	}
	await db
		.updateTable('account_tokens')
		.set({ expires_at: now })
		.where('user_id', '=', row.user_id)
		.where('id', '!=', row.id)
		.where('used_at', 'is', null)
		.where('expires_at', '>', now)
		.execute();
	return { ok: true, userId: row.user_id };
}
