/**
 * Accounts by e-mail: invitations and password resets. What the public
 * /account pages, their JSON twins and the admin API call.
 *
 * A reset request answers the same whether or not the address has an
 * account, and is throttled per address (silently: no more mail to that
 * mailbox) and per client address (visibly: 429), so the form can neither
 * tell who has an account nor be used to flood someone's mailbox.
 */
import { ApiError } from '../api/errors';
import { audit, actorOf, type Actor } from '../audit';
import { FailureThrottle } from '../auth/throttle';
import type { AppContext } from '../context';
import type { AccountTokenPurpose } from '../db/tables/mail';
import * as users from '../users/repository';
import { setPassword } from '../users/service';
import { queueInvitation, queueReset } from './links';
import { consumeAccountToken, inspectAccountToken, type TokenState } from './tokens';

// ---- throttles, one set per running app ----

interface ResetThrottles {
	/** per e-mail address: 3 links an hour at most, then silence */
	email: FailureThrottle;
	/** per client address: 10 requests in 15 min, then 429 (a ship's crew shares one NAT) */
	client: FailureThrottle;
}

const throttles = new WeakMap<AppContext, ResetThrottles>();

export function resetThrottles(ctx: AppContext): ResetThrottles {
	let t = throttles.get(ctx);
	if (!t) {
		t = {
			email: new FailureThrottle({ limit: 3, windowMs: 60 * 60_000 }),
			client: new FailureThrottle({ limit: 10, windowMs: 15 * 60_000 })
		};
		throttles.set(ctx, t);
	}
	return t;
}

export type ResetRequestResult = { ok: true } | { ok: false; retryAfterS: number };

/**
 * "Forgot your password": queues a reset link when the address belongs to an
 * enabled account. The result never says whether it did.
 */
export async function requestPasswordReset(
	ctx: AppContext,
	email: string,
	clientAddress: string
): Promise<ResetRequestResult> {
	const t = resetThrottles(ctx);
	const wait = t.client.retryAfterMs(clientAddress);
	if (wait > 0) return { ok: false, retryAfterS: Math.ceil(wait / 1000) };
	t.client.fail(clientAddress);

	const key = email.trim().toLowerCase();
	if (t.email.retryAfterMs(key) > 0) return { ok: true };
	t.email.fail(key);

	const row = await users.findByEmail(ctx.db, key);
	if (!row || row.disabled_at !== null) return { ok: true };
	// not awaited: the answer must come as soon for an account as for an unknown address, or its
	// timing would tell which addresses have accounts
	queueReset(
		ctx,
		row,
		false,
		{ userId: null, name: `reset form (${clientAddress})` },
		{ requested_from: clientAddress }
	).catch((err) => console.error('[aftwater] queueing a password reset failed:', err));
	return { ok: true };
}

/**
 * An administrator sends a user a link: a reset link when the user has a
 * password, a fresh invitation when they never set one.
 */
export async function sendAccountLink(ctx: AppContext, actor: Actor, userId: string) {
	const row = await users.findById(ctx.db, userId);
	if (!row) throw new ApiError(404, 'not_found', 'user not found');
	if (row.disabled_at !== null)
		throw new ApiError(409, 'conflict', 'the user is disabled; enable them first');
	if (row.password_hash === null) {
		const mailId = await ctx.db.transaction().execute(async (trx) => {
			const id = await queueInvitation(ctx, trx, row, actor);
			await audit(trx, actor, {
				action: 'account.invite',
				entity: 'user',
				entityId: row.id,
				details: { email: row.email, mail_id: id, resent: true }
			});
			return id;
		});
		return { kind: 'invitation' as const, mail_id: mailId };
	}
	const mailId = await queueReset(ctx, row, true, actor, { by_admin: true });
	return { kind: 'password_reset' as const, mail_id: mailId };
}

export interface TokenView {
	state: TokenState;
	/** only for a valid token: whose password the form sets */
	email?: string;
	name?: string;
}

/** What a link's page shows: the form for a valid token, else why not. */
export async function viewAccountToken(
	ctx: AppContext,
	purpose: AccountTokenPurpose,
	token: string
): Promise<TokenView> {
	const { state, userId } = await inspectAccountToken(ctx.db, purpose, token);
	if (state !== 'valid' || !userId) return { state };
	const row = await users.findById(ctx.db, userId);
	if (!row || row.disabled_at !== null) return { state: 'unknown' };
	return { state, email: row.email, name: row.name };
}

export type TokenUseResult =
	{ ok: true; userId: string; email: string } | { ok: false; state: Exclude<TokenState, 'valid'> };

/**
 * Sets the password through a link: the token is used up first (once, even
 * under a race), then the password is set, which signs the user out everywhere.
 */
export async function usePasswordToken(
	ctx: AppContext,
	purpose: AccountTokenPurpose,
	token: string,
	password: string
): Promise<TokenUseResult> {
	const view = await viewAccountToken(ctx, purpose, token);
	if (view.state !== 'valid') return { ok: false, state: view.state };
	const used = await consumeAccountToken(ctx.db, purpose, token);
	if (!used.ok) return used;
	const row = await users.findById(ctx.db, used.userId);
	if (!row) return { ok: false, state: 'unknown' };
	const actor = actorOf(row);
	await setPassword(ctx, actor, row.id, password);
	await audit(ctx.db, actor, {
		action: purpose === 'invite' ? 'account.invite_accept' : 'account.reset_complete',
		entity: 'user',
		entityId: row.id
	});
	return { ok: true, userId: row.id, email: row.email };
}

/** The message a link's page shows for a token it cannot use. */
export function tokenProblem(
	purpose: AccountTokenPurpose,
	state: Exclude<TokenState, 'valid'>
): string {
	const again =
		purpose === 'invite'
			? 'Ask your administrator to send you a new invitation.'
			: 'Ask for a new link on the “Forgot your password?” page.';
	switch (state) {
		case 'used':
			return `This link has already been used. ${again}`;
		case 'expired':
			return `This link has expired or was replaced by a newer one. ${again}`;
		default:
			return `This link is not valid: check that you copied all of it. ${again}`;
	}
}

/** The API's answer for a token it cannot use. */
export function tokenError(
	purpose: AccountTokenPurpose,
	state: Exclude<TokenState, 'valid'>
): ApiError {
	const code =
		state === 'used' ? 'token_used' : state === 'expired' ? 'token_expired' : 'token_invalid';
	return new ApiError(422, code, tokenProblem(purpose, state), { token: state });
}
