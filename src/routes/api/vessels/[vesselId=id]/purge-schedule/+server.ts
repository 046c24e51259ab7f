import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { purgeService } from '$lib/server/purge/api';
import { purgeScheduleInput } from '$lib/purge';

/** The separator's purge schedule, in words, with the next runs (ISO 8601). Any user in scope. */
export const GET = route(async ({ params }) =>
	purgeService(context()).getSchedule(Number(params.vesselId))
);

/** Technician or chief engineer of the vessel, or an admin; audited with old and new values and the reason. */
export const PUT = route(async (event) => {
	const user = requirePermission(event, 'purge.schedule');
	const change = await readJson(event.request, purgeScheduleInput);
	return purgeService(context()).setSchedule(Number(event.params.vesselId), change, actorOf(user));
});
