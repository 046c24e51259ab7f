import { z } from 'zod';
import { readQuery, requirePermission, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { listSink, transportInfo } from '$lib/server/mail/admin';

const query = z.object({
	limit: z.coerce.number().int().min(1).max(500).default(100),
	to: z.string().max(254).optional()
});

/** What the local SMTP sink received, newest first (without bodies). */
export const GET = route(async (event) => {
	requirePermission(event, 'system.read');
	const { limit, to } = readQuery(event.url, query);
	const ctx = context();
	return { ...transportInfo(ctx.services.mail), messages: await listSink(ctx.db, { limit, to }) };
});
