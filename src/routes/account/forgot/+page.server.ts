import { fail } from '@sveltejs/kit';
import type { Actions } from './$types';
import { context } from '$lib/server/context';
import { fieldErrors } from '$lib/server/api/errors';
import { requestPasswordReset } from '$lib/server/account/service';
import { resetRequest } from '$lib/server/account/schemas';

export const actions: Actions = {
	default: async (event) => {
		const form = await event.request.formData();
		const email = String(form.get('email') ?? '');
		const parsed = resetRequest.safeParse({ email });
		if (!parsed.success) return fail(400, { email, errors: fieldErrors(parsed.error) });
		const result = await requestPasswordReset(
			context(),
			parsed.data.email,
			event.getClientAddress()
		);
		if (!result.ok) {
			const min = Math.ceil(result.retryAfterS / 60);
			return fail(429, {
				email,
				errors: { _: `Too many requests from your network. Try again in ${min} min.` }
			});
		}
		// The same answer for every address: this page must not tell who has an account.
		return { sent: true, email: parsed.data.email };
	}
};
