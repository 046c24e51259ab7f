import { route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { endSession } from '$lib/server/auth/session';
import { sessionCredential } from '$lib/server/live/access';

export const POST = route(async (event) => {
	if (event.locals.session) {
		await endSession(context().lucia, event.locals.session.id, event.cookies, event.url);
		context().services.live?.closeCredential(sessionCredential(event.locals.session.id));
	}
	return { ok: true };
});
