import { route, userOf } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { visibleVesselIds } from '$lib/server/auth/guard';
import { sseResponse } from '$lib/server/live/sse';
import { streamAccess } from '$lib/server/live/access';

/**
 * Server-sent events for the fleet the caller may see: `snapshot` (active
 * alarms), then `alarm` changes as they happen and a `fleet` summary (latest
 * reading per shaft, separator, gateway) every second.
 */
export const GET = route(async (event) => {
	const user = userOf(event);
	const hub = context().services.live;
	if (!hub) throw new ApiError(503, 'unavailable', 'live data is not running');
	return sseResponse(await hub.openFleet(streamAccess(event), visibleVesselIds(user)));
});
