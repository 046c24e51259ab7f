import { json } from '@sveltejs/kit';
import { readJson, route } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { checkCredentials } from '$lib/server/auth/sign-in';
import { startSession } from '$lib/server/auth/session';
import * as users from '$lib/server/users/repository';
import { login } from '$lib/schemas/users';

export const POST = route(async (event) => {
	const ctx = context();
	const { email, password } = await readJson(event.request, login);
	const result = await checkCredentials(ctx, email, password, event.getClientAddress());
	if (!result.ok && result.reason === 'throttled') {
		throw new ApiError(429, 'throttled', `too many failed sign-ins; try again in ${result.retryAfterS} s`, undefined, {
			'retry-after': String(result.retryAfterS)
		});
	}
	if (!result.ok) throw new ApiError(401, 'invalid_credentials', 'wrong e-mail or password');
	await startSession(ctx.lucia, result.userId, event.cookies, event.url);
	const row = await users.findById(ctx.db, result.userId);
	return json({ user: await users.toAppUser(ctx.db, row!) });
});
