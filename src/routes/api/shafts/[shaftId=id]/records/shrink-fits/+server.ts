import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { listShrinkFits } from '$lib/server/records/repository';
import { addShrinkFit, recordShaft } from '$lib/server/records/service';
import { shrinkFitBody } from '$lib/schemas/records';

export const GET = route(async ({ params }) => {
	const { db } = context();
	return { shrink_fits: await listShrinkFits(db, (await recordShaft(db, params)).id) };
});

/** A liner shrink-fit plan; answered with the heating ΔT and the temperature to reach. */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'records.write');
	const { db } = context();
	const shaft = await recordShaft(db, event.params);
	const body = await readJson(event.request, shrinkFitBody);
	return json({ shrink_fit: await addShrinkFit(db, actorOf(user), shaft, body) }, { status: 201 });
});
