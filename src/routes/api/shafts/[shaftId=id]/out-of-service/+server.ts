import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { alarmService } from '$lib/server/alarms/settings-api';
import { outOfServiceBody } from '$lib/schemas/alarms';
import { ALARM_SCOPE } from '$lib/alarms/types';

/** Takes one alarm type of this shaft out of service (or back), with a reason; audited. */
export const PUT = route(async (event) => {
	const user = requirePermission(event, 'alarm.out_of_service');
	const body = await readJson(event.request, outOfServiceBody);
	if (ALARM_SCOPE[body.type] !== 'shaft') {
		throw new ApiError(422, 'invalid', `type: ${body.type} belongs to the separator; use /api/vessels/{id}/out-of-service`, { type: 'a separator alarm' });
	}
	const ctx = context();
	const shaftId = Number(event.params.shaftId);
	const { vessel_id } = await ctx.db.selectFrom('shafts').select('vessel_id').where('id', '=', shaftId).executeTakeFirstOrThrow();
	await alarmService(ctx).setOutOfService({ vesselId: vessel_id, shaftId, type: body.type }, body.out_of_service, body.reason, actorOf(user));
	return { shaft_id: shaftId, type: body.type, out_of_service: body.out_of_service };
});
