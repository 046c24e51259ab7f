import { readQuery, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { purgeService, purgesQuery, purgesRange } from '$lib/server/purge/api';

/** Purge commands requested in [from, to] (ISO 8601 or epoch ms; the last day by default), newest first. */
export const GET = route(async ({ params, url }) => {
	const vesselId = Number(params.vesselId);
	const { from, to } = purgesRange(readQuery(url, purgesQuery));
	const { purges, truncated } = await purgeService(context()).purges(vesselId, from, to);
	return {
		vessel_id: vesselId,
		from: new Date(from).toISOString(),
		to: new Date(to).toISOString(),
		purges,
		truncated
	};
});
