import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { notFound } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { fleetWithState } from '$lib/server/fleet/state';
import { updateVessel } from '$lib/server/fleet/service';
import { vesselUpdate } from '$lib/schemas/fleet';

export const GET = route(async ({ params }) => {
	const [vessel] = await fleetWithState(context(), [Number(params.vesselId)]);
	if (!vessel) throw notFound('vessel');
	return { vessel };
});

export const PATCH = route(async (event) => {
	const user = requirePermission(event, 'fleet.configure');
	const input = await readJson(event.request, vesselUpdate.strict()) // a misspelt field is named, not dropped;
	return { vessel: await updateVessel(context(), actorOf(user), Number(event.params.vesselId), input) };
});
