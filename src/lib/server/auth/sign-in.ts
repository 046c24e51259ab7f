/**
 * Signing in: throttled per account and address, per account and per client address
 * (see createSignInThrottles), the same answer
 * for an unknown address as for a wrong password, and a hash check either way
 * so the time taken does not tell which.
 */
import type { AppContext } from '../context';
import { dummyHash, verifySecret } from './password';
import * as users from '../users/repository';

export type SignInResult =
	| { ok: true; userId: string }
	| { ok: false; reason: 'invalid' }
	| { ok: false; reason: 'throttled'; retryAfterS: number };

export async function checkCredentials(
	ctx: AppContext,
	email: string,
	password: string,
	clientAddress: string
): Promise<SignInResult> {
	const accountKey = email.trim().toLowerCase();
	const { pair, account, address } = ctx.throttles;
	const pairKey = `${accountKey}\n${clientAddress}`;
	const wait = Math.max(pair.retryAfterMs(pairKey), account.retryAfterMs(accountKey), address.retryAfterMs(clientAddress));
	if (wait > 0) return { ok: false, reason: 'throttled', retryAfterS: Math.ceil(wait / 1000) };

	const row = await users.findByEmail(ctx.db, accountKey);
	const hash = row?.password_hash ?? (await dummyHash());
	const good = (await verifySecret(hash, password)) && !!row?.password_hash && row.disabled_at === null;
	if (!good) {
		pair.fail(pairKey);
		account.fail(accountKey);
		address.fail(clientAddress);
		return { ok: false, reason: 'invalid' };
	}
	pair.reset(pairKey);
	return { ok: true, userId: row!.id };
}
