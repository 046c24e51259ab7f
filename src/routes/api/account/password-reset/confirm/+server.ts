import { readJson, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { tokenError, usePasswordToken } from '$lib/server/account/service';
import { tokenPassword } from '$lib/server/account/schemas';

/** Set a new password with the token from a reset e-mail; signs the user out everywhere. */
export const POST = route(async (event) => {
	const { token, password } = await readJson(event.request, tokenPassword);
	const result = await usePasswordToken(context(), 'reset', token, password);
	if (!result.ok) throw tokenError('reset', result.state);
	return { ok: true, email: result.email };
});
