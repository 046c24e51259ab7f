import { route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { shaftRecords } from '$lib/server/records/repository';
import { recordShaft } from '$lib/server/records/service';

/** Every commissioning and maintenance record of the shaft, newest first (wear readings oldest first, with their trend). */
export const GET = route(async ({ params }) => {
	const { db } = context();
	return shaftRecords(db, (await recordShaft(db, params)).id);
});
