import { route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { endSession } from '$lib/server/auth/session';

export const POST = route(async (event) => {
	if (event.locals.session) {
		await endSession(context().lucia, event.locals.session.id, event.cookies, event.url);
	}
	return { ok: true };
});
