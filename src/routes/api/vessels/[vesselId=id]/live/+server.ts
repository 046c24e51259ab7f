import { z } from 'zod';
import { wholeNumber } from '$lib/schemas/query';
import { readQuery, route } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { sseResponse } from '$lib/server/live/sse';
import { streamAccess } from '$lib/server/live/access';

const query = z.object({
	/** minutes of history in the first snapshot */
	window: wholeNumber(5, 60).default(15),
	/** for clients that cannot set the Last-Event-ID header */
	last_event_id: wholeNumber(1, Number.MAX_SAFE_INTEGER).optional()
});

/**
 * Server-sent events for one vessel: `snapshot` (the recent window) first,
 * then `samples` batches, `alarm`, `gateway` and `purge` events. Reconnect with
 * Last-Event-ID to resume without a gap.
 */
export const GET = route(async (event) => {
	const q = readQuery(event.url, query);
	const header = event.request.headers.get('last-event-id');
	const lastEventId = header && /^\d+$/.test(header) ? Number(header) : (q.last_event_id ?? null);
	const hub = context().services.live;
	if (!hub) throw new ApiError(503, 'unavailable', 'live data is not running');
	const client = await hub.openVessel(streamAccess(event), Number(event.params.vesselId), q.window * 60_000, lastEventId);
	return sseResponse(client);
});
