import { readQuery, route, userOf } from '$lib/server/api/handler';
import { visibleVesselIds } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import { fleetCompliance } from '$lib/server/history/fleet';
import { fleetComplianceQuery } from '$lib/server/history/query';

/** Compliance of every shaft the caller may see, for one period. */
export const GET = route(async (event) => {
	const user = userOf(event);
	const q = readQuery(event.url, fleetComplianceQuery);
	return {
		from: q.from,
		to: q.to,
		rows: await fleetCompliance(context(), visibleVesselIds(user), q.from, q.to)
	};
});
