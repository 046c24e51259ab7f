import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { listBearingMeasurements } from '$lib/server/records/repository';
import { addBearingMeasurement, recordShaft } from '$lib/server/records/service';
import { bearingMeasurementBody } from '$lib/schemas/records';

export const GET = route(async ({ params }) => {
	const { db } = context();
	return {
		bearing_measurements: await listBearingMeasurements(db, (await recordShaft(db, params)).id)
	};
});

/** Bore and journal diameters at one station; answered with the running clearance. */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'records.write');
	const { db } = context();
	const shaft = await recordShaft(db, event.params);
	const body = await readJson(event.request, bearingMeasurementBody);
	return json(
		{ bearing_measurement: await addBearingMeasurement(db, actorOf(user), shaft, body) },
		{ status: 201 }
	);
});
