import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { context } from '$lib/server/context';
import { checkCredentials } from '$lib/server/auth/sign-in';
import { startSession } from '$lib/server/auth/session';
import { login } from '$lib/schemas/users';
import { fieldErrors } from '$lib/server/api/errors';
import { safeNext } from '$lib/server/auth/next';

/** the demo password the README gives */
const PUBLISHED_DEMO_PASSWORD = 'aftwater-demo';

export const load: PageServerLoad = async ({ locals, url }) => {
	if (locals.user) redirect(303, safeNext(url.searchParams.get('next'), url.origin));
	const { DEMO, DEMO_PASSWORD } = context().config;
	// the published default is named on the page; a password set for a demo is not
	return { demo: DEMO, demoPassword: DEMO && DEMO_PASSWORD === PUBLISHED_DEMO_PASSWORD ? DEMO_PASSWORD : null };
};

export const actions: Actions = {
	default: async (event) => {
		const form = await event.request.formData();
		const values = { email: String(form.get('email') ?? ''), password: String(form.get('password') ?? '') };
		const parsed = login.safeParse(values);
		if (!parsed.success) return fail(400, { email: values.email, errors: fieldErrors(parsed.error) });

		const ctx = context();
		const result = await checkCredentials(ctx, parsed.data.email, parsed.data.password, event.getClientAddress());
		if (!result.ok) {
			const message =
				result.reason === 'throttled'
					? `Too many failed sign-ins. Try again in ${Math.ceil(result.retryAfterS / 60)} min.`
					: 'Wrong e-mail or password.';
			const errors: Record<string, string> = { _: message };
			return fail(result.reason === 'throttled' ? 429 : 400, { email: values.email, errors });
		}
		await startSession(ctx.lucia, result.userId, event.cookies, event.url);
		redirect(303, safeNext(event.url.searchParams.get('next'), event.url.origin));
	}
};
