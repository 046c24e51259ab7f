/**
 * Queuing the e-mails that carry account links, each inside a transaction
 * with the token it carries (and, for an invitation, the user it is for).
 */
import type { Transaction } from 'kysely';
import { ROLE_LABELS, type Role } from '$lib/types';
import { audit, type Actor } from '../audit';
import type { AppContext } from '../context';
import type { Database } from '../db/schema';
import { enqueueMail, mailEnv } from '../mail/outbox';
import { renderMail } from '../mail/templates';
import { issueAccountToken } from './tokens';

/** A person's name for an e-mail, rather than the address the audit log keeps. */
async function nameOf(db: Transaction<Database>, actor: Actor): Promise<string | null> {
	if (!actor.userId) return null;
	const row = await db
		.selectFrom('users')
		.select('name')
		.where('id', '=', actor.userId)
		.executeTakeFirst();
	return row?.name ?? actor.name;
}

export interface Invitee {
	id: string;
	email: string;
	name: string;
	role: Role;
}

/**
 * Issues an invitation token and queues its e-mail, inside the caller's
 * transaction (the one that inserts the user), so there is never a user
 * without their invitation or an invitation without its user.
 */
export async function queueInvitation(
	ctx: AppContext,
	trx: Transaction<Database>,
	user: Invitee,
	invitedBy: Actor
): Promise<number> {
	const { token, expiresAt } = await issueAccountToken(trx, 'invite', user.id);
	const mail = renderMail(
		{
			kind: 'invitation',
			data: {
				recipient: { name: user.name },
				invitedBy: (await nameOf(trx, invitedBy)) ?? 'Your administrator',
				roleLabel: ROLE_LABELS[user.role],
				token,
				expiresAt
			}
		},
		mailEnv(ctx.config)
	);
	return enqueueMail(trx, { kind: 'invitation', to: user.email, toUserId: user.id, ...mail });
}

/**
 * A reset link; `byAdmin` says in the e-mail that an administrator sent it
 * (by their name), so the reader is not puzzled by a reset they never asked for.
 */
export async function queueReset(
	ctx: AppContext,
	user: { id: string; email: string; name: string },
	byAdmin: boolean,
	actor: Actor,
	details: Record<string, unknown>
): Promise<number> {
	return ctx.db.transaction().execute(async (trx) => {
		const requestedBy = byAdmin ? ((await nameOf(trx, actor)) ?? 'Your administrator') : null;
		const { token, expiresAt } = await issueAccountToken(trx, 'reset', user.id);
		const mail = renderMail(
			{
				kind: 'password_reset',
				data: { recipient: { name: user.name }, token, expiresAt, requestedBy }
			},
			mailEnv(ctx.config)
		);
		const id = await enqueueMail(trx, {
			kind: 'password_reset',
			to: user.email,
			toUserId: user.id,
			...mail
		});
		await audit(trx, actor, {
			action: 'account.reset_link',
			entity: 'user',
			entityId: user.id,
			details: { email: user.email, mail_id: id, ...details }
		});
		return id;
	});
}
