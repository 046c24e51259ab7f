import { route, userOf } from '$lib/server/api/handler';
import { notFound } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { revokeApiToken } from '$lib/server/admin/my-account';

export const DELETE = route(async (event) => {
	const user = userOf(event);
	const ctx = context();
	if (!(await revokeApiToken(ctx, actorOf(user), user.id, Number(event.params.tokenId)))) throw notFound('token');
	return { ok: true };
});
