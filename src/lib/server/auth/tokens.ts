/**
 * API tokens for integrations (`Authorization: Bearer <token>`). The token is
 * 32 random bytes shown once; only its SHA-256 is stored — a token has full
 * entropy, so a slow hash adds nothing but latency to every call.
 */
import { createHash, randomBytes } from 'node:crypto';
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';

const PREFIX = 'awt_';

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

export async function issueToken(db: Kysely<Database>, userId: string, name: string) {
	const token = PREFIX + randomBytes(32).toString('base64url');
	const row = await db
		.insertInto('api_tokens')
		.values({
			user_id: userId,
			name,
			token_hash: hashToken(token),
			created_at: Date.now(),
			last_used_at: null,
			revoked_at: null
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	return { id: row.id, token };
}

/** The live token presented and the user behind it, or null. */
export async function liveToken(db: Kysely<Database>, token: string): Promise<{ tokenId: number; userId: string } | null> {
	if (!token.startsWith(PREFIX) || token.length > 100) return null;
	const row = await db
		.selectFrom('api_tokens')
		.select(['id', 'user_id'])
		.where('token_hash', '=', hashToken(token))
		.where('revoked_at', 'is', null)
		.executeTakeFirst();
	if (!row) return null;
	await db.updateTable('api_tokens').set({ last_used_at: Date.now() }).where('id', '=', row.id).execute();
	return { tokenId: row.id, userId: row.user_id };
}

export async function listTokens(db: Kysely<Database>, userId: string) {
	return db
		.selectFrom('api_tokens')
		.select(['id', 'name', 'created_at', 'last_used_at', 'revoked_at'])
		.where('user_id', '=', userId)
		.orderBy('created_at', 'desc')
		.execute();
}

export async function revokeToken(db: Kysely<Database>, userId: string, id: number) {
	const res = await db
		.updateTable('api_tokens')
		.set({ revoked_at: Date.now() })
		.where('id', '=', id)
		.where('user_id', '=', userId)
		.where('revoked_at', 'is', null)
		.executeTakeFirst();
	return Number(res.numUpdatedRows) > 0;
}
