import { readJson, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { tokenError, usePasswordToken } from '$lib/server/account/service';
import { tokenPassword } from '$lib/server/account/schemas';

/** Set the first password with the token from an invitation e-mail. */
export const POST = route(async (event) => {
	const { token, password } = await readJson(event.request, tokenPassword);
	const result = await usePasswordToken(context(), 'invite', token, password);
	if (!result.ok) throw tokenError('invite', result.state);
	return { ok: true, email: result.email };
});
