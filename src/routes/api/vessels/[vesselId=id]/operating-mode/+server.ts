import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { setOperatingMode } from '$lib/server/fleet/service';
import { operatingModeUpdate } from '$lib/schemas/fleet';

/** At sea, in port or dry-dock; set by the vessel's chief engineer or an admin, audited. */
export const PUT = route(async (event) => {
	const user = requirePermission(event, 'vessel.operating_mode');
	const { operating_mode, reason } = await readJson(event.request, operatingModeUpdate);
	const vessel = await setOperatingMode(context(), actorOf(user), Number(event.params.vesselId), operating_mode, reason);
	return { vessel };
});
