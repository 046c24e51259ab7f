import { requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { retryFailedMail } from '$lib/server/mail/admin';

/** Queue a failed message again, for a fresh set of attempts. */
export const POST = route(async (event) => {
	const admin = requirePermission(event, 'system.read');
	await retryFailedMail(context(), actorOf(admin), Number(event.params.mailId));
	return { ok: true };
});
