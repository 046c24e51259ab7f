import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route, userOf } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { visibleVesselIds } from '$lib/server/auth/guard';
import { fleetWithState } from '$lib/server/fleet/state';
import { createVessel } from '$lib/server/fleet/service';
import { vesselCreate } from '$lib/schemas/fleet';

/** Vessels the caller may see, with their shafts and current state. */
export const GET = route(async (event) => {
	const user = userOf(event);
	return { vessels: await fleetWithState(context(), visibleVesselIds(user)) };
});

export const POST = route(async (event) => {
	const user = requirePermission(event, 'fleet.configure');
	const input = await readJson(event.request, vesselCreate);
	const vessel = await createVessel(context(), actorOf(user), input);
	return json({ vessel }, { status: 201 });
});
