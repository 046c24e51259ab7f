import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { notFound } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { getShaft } from '$lib/server/fleet/repository';
import { updateShaft } from '$lib/server/fleet/service';
import { shaftUpdate } from '$lib/schemas/fleet';

/** Configuration, including diameter_mm and the derived min_flow_lpm. */
export const GET = route(async ({ params }) => {
	const shaft = await getShaft(context().db, Number(params.shaftId));
	if (!shaft) throw notFound('shaft');
	return { shaft };
});

export const PATCH = route(async (event) => {
	const user = requirePermission(event, 'fleet.configure');
	const input = await readJson(event.request, shaftUpdate.strict()) // a misspelt field is named, not dropped;
	return { shaft: await updateShaft(context(), actorOf(user), Number(event.params.shaftId), input) };
});
