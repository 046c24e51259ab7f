import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { unshelve } from '$lib/server/alarms/actions';
import { unshelveBody } from '$lib/schemas/alarms';

export const POST = route(async (event) => {
	const user = requirePermission(event, 'alarm.shelve');
	const { comment } = await readJson(event.request, unshelveBody);
	return { alarm: await unshelve(context(), Number(event.params.alarmId), actorOf(user), comment ?? null) };
});
