import { requirePermission, route } from '$lib/server/api/handler';
import { notFound } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { getSinkMessage } from '$lib/server/mail/admin';

/** One message the sink received, with its text and HTML bodies. */
export const GET = route(async (event) => {
	requirePermission(event, 'system.read');
	const message = await getSinkMessage(context().db, Number(event.params.mailId));
	if (!message) throw notFound('message');
	return { message };
});
