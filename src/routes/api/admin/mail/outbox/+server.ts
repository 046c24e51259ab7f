import { z } from 'zod';
import { wholeNumber } from '$lib/schemas/query';
import { readQuery, requirePermission, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { OUTBOX_STATUSES, transportInfo } from '$lib/server/mail/admin';
import { listOutbox, outboxCounts } from '$lib/server/mail/outbox';

const query = z.object({
	status: z.enum(OUTBOX_STATUSES).optional(),
	limit: wholeNumber(1, 500).default(100)
});

/** The outbox: counts by state and the messages (without bodies), newest first. */
export const GET = route(async (event) => {
	requirePermission(event, 'system.read');
	const { status, limit } = readQuery(event.url, query);
	const ctx = context();
	return {
		...transportInfo(ctx.services.mail),
		counts: await outboxCounts(ctx.db),
		messages: await listOutbox(ctx.db, { status, limit })
	};
});
