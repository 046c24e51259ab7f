import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { wearOf } from '$lib/server/records/repository';
import { addWearReading, recordShaft } from '$lib/server/records/service';
import { wearReadingBody } from '$lib/schemas/records';

/** Wear-down readings, the wear limit and the fitted trend to it. */
export const GET = route(async ({ params }) => {
	const { db } = context();
	return wearOf(db, (await recordShaft(db, params)).id);
});

export const POST = route(async (event) => {
	const user = requirePermission(event, 'records.write');
	const { db } = context();
	const shaft = await recordShaft(db, event.params);
	const body = await readJson(event.request, wearReadingBody);
	return json(await addWearReading(db, actorOf(user), shaft, body), { status: 201 });
});
