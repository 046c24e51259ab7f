import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { shelve } from '$lib/server/alarms/actions';
import { shelveBody } from '$lib/schemas/alarms';

export const POST = route(async (event) => {
	const user = requirePermission(event, 'alarm.shelve');
	const { duration_s, reason } = await readJson(event.request, shelveBody);
	return { alarm: await shelve(context(), Number(event.params.alarmId), actorOf(user), duration_s, reason) };
});
