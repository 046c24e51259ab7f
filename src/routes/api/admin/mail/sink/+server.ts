import { z } from 'zod';
import { wholeNumber } from '$lib/schemas/query';
import { readQuery, requirePermission, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { listSink, transportInfo } from '$lib/server/mail/admin';

const query = z.object({
	limit: wholeNumber(1, 500).default(100),
	to: z.string().max(254).optional()
});

/** What the local SMTP sink received, newest first (without bodies). */
export const GET = route(async (event) => {
	requirePermission(event, 'system.read');
	const { limit, to } = readQuery(event.url, query);
	const ctx = context();
	return { ...transportInfo(ctx.services.mail), messages: await listSink(ctx.db, { limit, to }) };
});
