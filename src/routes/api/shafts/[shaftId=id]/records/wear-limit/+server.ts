import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { recordShaft, setWearLimit } from '$lib/server/records/service';
import { wearLimitBody } from '$lib/schemas/records';

/** The bearing's wear limit (the maker's or the class society's figure), with where it comes from; audited. */
export const PUT = route(async (event) => {
	const user = requirePermission(event, 'records.write');
	const { db } = context();
	const shaft = await recordShaft(db, event.params);
	const body = await readJson(event.request, wearLimitBody);
	return setWearLimit(db, actorOf(user), shaft, body);
});
