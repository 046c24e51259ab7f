import { route } from '$lib/server/api/handler';
import { notFound } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { alarmWithEvents } from '$lib/server/alarms/queries';

/** One alarm with the history of its transitions. */
export const GET = route(async ({ params }) => {
	const found = await alarmWithEvents(context().db, Number(params.alarmId));
	if (!found) throw notFound('alarm');
	return found;
});
