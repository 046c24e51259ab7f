import { json } from '@sveltejs/kit';
import { readJson, route } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { requestPasswordReset } from '$lib/server/account/service';
import { resetRequest } from '$lib/server/account/schemas';

/**
 * Ask for a reset link. 202 whether or not the address has an account (the
 * link goes only to one that does); 429 when this client asks too often.
 */
export const POST = route(async (event) => {
	const { email } = await readJson(event.request, resetRequest);
	const result = await requestPasswordReset(context(), email, event.getClientAddress());
	if (!result.ok) {
		throw new ApiError(
			429,
			'throttled',
			`too many reset requests; try again in ${result.retryAfterS} s`,
			undefined,
			{
				'retry-after': String(result.retryAfterS)
			}
		);
	}
	return json(
		{
			ok: true,
			message: 'If an account has this address, a link to reset its password is on its way.'
		},
		{ status: 202 }
	);
});
