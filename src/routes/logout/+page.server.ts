import { redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { context } from '$lib/server/context';
import { endSession } from '$lib/server/auth/session';
import { sessionCredential } from '$lib/server/live/access';

export const load: PageServerLoad = () => redirect(303, '/');

export const actions: Actions = {
	default: async ({ locals, cookies, url }) => {
		if (locals.session) {
			await endSession(context().lucia, locals.session.id, cookies, url);
			context().services.live?.closeCredential(sessionCredential(locals.session.id));
		}
		redirect(303, '/login');
	}
};
