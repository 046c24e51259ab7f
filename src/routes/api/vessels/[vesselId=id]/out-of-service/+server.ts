import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { alarmService } from '$lib/server/alarms/settings-api';
import { outOfServiceBody } from '$lib/schemas/alarms';
import { ALARM_SCOPE } from '$lib/alarms/types';

/** Takes one of the separator's alarm types out of service (or back), with a reason; audited. */
export const PUT = route(async (event) => {
	const user = requirePermission(event, 'alarm.out_of_service');
	const body = await readJson(event.request, outOfServiceBody);
	if (ALARM_SCOPE[body.type] !== 'separator') {
		throw new ApiError(422, 'invalid', `type: ${body.type} belongs to a shaft; use /api/shafts/{id}/out-of-service`, { type: 'a shaft alarm' });
	}
	const vesselId = Number(event.params.vesselId);
	await alarmService(context()).setOutOfService({ vesselId, shaftId: null, type: body.type }, body.out_of_service, body.reason, actorOf(user));
	return { vessel_id: vesselId, type: body.type, out_of_service: body.out_of_service };
});
