import { readJson, route, userOf } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { startSession } from '$lib/server/auth/session';
import { changeOwnPassword } from '$lib/server/users/service';
import { passwordChange } from '$lib/schemas/users';

/** Change your password: every session is signed out, then this one starts afresh. */
export const PUT = route(async (event) => {
	const user = userOf(event);
	const { current_password, new_password } = await readJson(event.request, passwordChange);
	const ctx = context();
	await changeOwnPassword(ctx, actorOf(user), user.id, current_password, new_password);
	if (event.locals.session) await startSession(ctx.lucia, user.id, event.cookies, event.url);
	return { ok: true };
});
