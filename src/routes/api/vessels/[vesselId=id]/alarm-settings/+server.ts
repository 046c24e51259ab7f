import { route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { alarmService, readSettingsUpdate } from '$lib/server/alarms/settings-api';
import { ALARM_SETTING_FIELDS } from '$lib/alarms/settings';

/** The separator's alarm settings (ΔP setpoint and delays), per vessel. */
export const GET = route(async ({ params }) => ({
	vessel_id: Number(params.vesselId),
	settings: alarmService(context()).settings.forVessel(Number(params.vesselId)),
	fields: ALARM_SETTING_FIELDS
}));

export const PUT = route(async (event) => {
	const ctx = context();
	const { actor, update } = await readSettingsUpdate(event);
	const vesselId = Number(event.params.vesselId);
	const settings = await alarmService(ctx).settings.update({ vesselId }, update, actor);
	ctx.events.emit('config.changed', { vesselId });
	return { vessel_id: vesselId, settings, fields: ALARM_SETTING_FIELDS };
});
