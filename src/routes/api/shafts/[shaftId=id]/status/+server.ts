import { route } from '$lib/server/api/handler';
import { notFound } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { shaftStatus } from '$lib/server/alarms/queries';

/** The latest sample, min_flow_lpm, margin, sea pressure and the open alarms. */
export const GET = route(async ({ params }) => {
	const status = await shaftStatus(context(), Number(params.shaftId));
	if (!status) throw notFound('shaft');
	return status;
});
