/**
 * What the settings page changes for the signed-in user: their unit system and
 * their API tokens. Audited like the JSON API's twins (/api/me/…), with the
 * same action names, so the log reads the same whichever way a change came.
 */
import type { UnitSystem } from '$lib/types';
import { audit, type Actor } from '../audit';
import type { AppContext } from '../context';
import { issueToken, revokeToken } from '../auth/tokens';
import { tokenCredential } from '../live/access';

export async function setUnits(ctx: AppContext, actor: Actor, userId: string, units: UnitSystem) {
	const before = await ctx.db
		.selectFrom('users')
		.select('units')
		.where('id', '=', userId)
		.executeTakeFirstOrThrow();
	if (before.units === units) return;
	await ctx.db.transaction().execute(async (trx) => {
		await trx.updateTable('users').set({ units }).where('id', '=', userId).execute();
		await audit(trx, actor, {
			action: 'user.preferences',
			entity: 'user',
			entityId: userId,
			details: { units: { from: before.units, to: units } }
		});
	});
}

/** A new token, returned once; only its hash is kept. */
export async function createApiToken(ctx: AppContext, actor: Actor, userId: string, name: string) {
	const { id, token } = await issueToken(ctx.db, userId, name);
	await audit(ctx.db, actor, {
		action: 'token.issue',
		entity: 'api_token',
		entityId: id,
		details: { name }
	});
	return { id, name, token };
}

/** false when the token is not the user's or is already revoked. */
export async function revokeApiToken(ctx: AppContext, actor: Actor, userId: string, id: number) {
	if (!(await revokeToken(ctx.db, userId, id))) return false;
	ctx.services.live?.closeCredential(tokenCredential(id)); // its open streams end with it
	await audit(ctx.db, actor, { action: 'token.revoke', entity: 'api_token', entityId: id });
	return true;
}
