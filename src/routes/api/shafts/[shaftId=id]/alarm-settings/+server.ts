import { route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { alarmService, readSettingsUpdate, shaftSettingsResponse } from '$lib/server/alarms/settings-api';

export const GET = route(async ({ params }) => shaftSettingsResponse(context(), Number(params.shaftId)));

/** Any subset of the settings; the vessel's chief engineer and admins; audited. */
export const PUT = route(async (event) => {
	const ctx = context();
	const { actor, update } = await readSettingsUpdate(event);
	const shaftId = Number(event.params.shaftId);
	// hooks has already answered 404 for a shaft that does not exist or is out of scope
	const { vessel_id } = await ctx.db.selectFrom('shafts').select('vessel_id').where('id', '=', shaftId).executeTakeFirstOrThrow();
	const next = await alarmService(ctx).settings.update({ shaftId, vesselId: vessel_id }, update, actor);
	ctx.events.emit('config.changed', { vesselId: vessel_id });
	return shaftSettingsResponse(ctx, shaftId, next);
});
