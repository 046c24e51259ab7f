import { route, userOf } from '$lib/server/api/handler';
import { notFound } from '$lib/server/api/errors';
import { audit, actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { revokeToken } from '$lib/server/auth/tokens';

export const DELETE = route(async (event) => {
	const user = userOf(event);
	const ctx = context();
	const id = Number(event.params.tokenId);
	if (!(await revokeToken(ctx.db, user.id, id))) throw notFound('token');
	await audit(ctx.db, actorOf(user), { action: 'token.revoke', entity: 'api_token', entityId: id });
	return { ok: true };
});
