import { json } from '@sveltejs/kit';
import { requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { sendAccountLink } from '$lib/server/account/service';

/**
 * An administrator sends the user a link to set a password: a reset link,
 * or a fresh invitation when the user never set one. 202: the e-mail is queued.
 */
export const POST = route(async (event) => {
	const admin = requirePermission(event, 'users.manage');
	const sent = await sendAccountLink(context(), actorOf(admin), event.params.userId!);
	return json({ ok: true, ...sent }, { status: 202 });
});
