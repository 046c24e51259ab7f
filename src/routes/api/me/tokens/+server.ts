import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { readJson, route, userOf } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { listTokens } from '$lib/server/auth/tokens';
import { createApiToken } from '$lib/server/admin/my-account';

export const GET = route(async (event) => ({ tokens: await listTokens(context().db, userOf(event).id) }));

/** A new API token for the caller; it acts with the caller's role and scope. Shown once. */
export const POST = route(async (event) => {
	const user = userOf(event);
	// a token may not mint tokens: a stolen one must not outlive its revocation through others
	if (!event.locals.session) throw new ApiError(403, 'forbidden', 'new tokens are issued to a signed-in session only');
	const { name } = await readJson(event.request, z.object({ name: z.string().trim().min(1).max(80) }));
	const created = await createApiToken(context(), actorOf(user), user.id, name);
	return json(created, { status: 201, headers: { 'cache-control': 'no-store' } });
});
