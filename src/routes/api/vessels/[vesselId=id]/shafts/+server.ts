import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { createShaft } from '$lib/server/fleet/service';
import { shaftCreate } from '$lib/schemas/fleet';

export const POST = route(async (event) => {
	const user = requirePermission(event, 'fleet.configure');
	const input = await readJson(event.request, shaftCreate);
	const shaft = await createShaft(context(), actorOf(user), Number(event.params.vesselId), input);
	return json({ shaft }, { status: 201 });
});
