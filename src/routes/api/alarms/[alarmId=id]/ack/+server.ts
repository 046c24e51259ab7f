import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { acknowledge } from '$lib/server/alarms/actions';
import { acknowledgeBody } from '$lib/schemas/alarms';

export const POST = route(async (event) => {
	const user = requirePermission(event, 'alarm.acknowledge');
	const { comment } = await readJson(event.request, acknowledgeBody);
	return { alarm: await acknowledge(context(), Number(event.params.alarmId), actorOf(user), comment ?? null) };
});
