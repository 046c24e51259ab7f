import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { context } from '$lib/server/context';
import { pagePermission, pageUser } from '$lib/server/auth/page-guard';
import { actorOf } from '$lib/server/audit';
import { ApiError, fieldErrors } from '$lib/server/api/errors';
import { getShaft } from '$lib/server/fleet/repository';
import { shaftLimits } from '$lib/server/alarms/limits';
import { changedSettings, SETTING_KEYS, SHAFT_SETTING_KEYS, toFormValue } from '$lib/alarms/settings-form';
import { outOfServiceBody } from '$lib/schemas/alarms';
import { ALARM_SCOPE, SHAFT_ALARM_TYPES } from '$lib/alarms/types';

export const load: PageServerLoad = async ({ params, locals }) => {
	const user = pageUser(locals);
	const ctx = context();
	const shaft = await getShaft(ctx.db, Number(params.shaftId));
	if (!shaft || shaft.vessel_id !== Number(params.vesselId)) error(404, 'Not found');
	const settings = ctx.services.alarms!.settings.forShaft(shaft.id);
	const removed = SHAFT_ALARM_TYPES.filter((t) => ctx.services.alarms!.engine.isRemoved(shaft.vessel_id, shaft.id, t));
	return {
		shaft,
		limits: shaftLimits(ctx, shaft),
		settingsForm: Object.fromEntries(SETTING_KEYS.map((k) => [k, toFormValue(k, settings[k], user.units)])),
		removed
	};
};

export const actions: Actions = {
	settings: async ({ locals, params, request }) => {
		const user = pagePermission(locals, 'alarm.settings');
		const ctx = context();
		const shaftId = Number(params.shaftId);
		const current = ctx.services.alarms!.settings.forShaft(shaftId);
		const { update, errors } = changedSettings(await request.formData(), current, user.units, SHAFT_SETTING_KEYS);
		if (Object.keys(errors).length) return fail(400, { settings: { errors, saved: false } });
		try {
			await ctx.services.alarms!.settings.update({ shaftId, vesselId: Number(params.vesselId) }, update, actorOf(user));
		} catch (err) {
			if (err instanceof ApiError) return fail(400, { settings: { errors: err.fields ?? { _: err.message }, saved: false } });
			throw err;
		}
		ctx.events.emit('config.changed', { vesselId: Number(params.vesselId) });
		return { settings: { errors: {} as Record<string, string>, saved: true } };
	},
	service: async ({ locals, params, request }) => {
		const user = pagePermission(locals, 'alarm.out_of_service');
		const form = await request.formData();
		const parsed = outOfServiceBody.safeParse({
			type: form.get('type'),
			out_of_service: form.get('out_of_service') === 'true',
			reason: form.get('reason')
		});
		// the row's type and what was typed come back with the errors, to show them where they belong
		const entered = { type: String(form.get('type') ?? ''), reason: String(form.get('reason') ?? '') };
		if (!parsed.success) return fail(400, { service: { ...entered, errors: fieldErrors(parsed.error) } });
		if (ALARM_SCOPE[parsed.data.type] !== 'shaft') {
			return fail(400, { service: { ...entered, errors: { type: 'a separator alarm: take it out of service on the separator page' } } });
		}
		await context().services.alarms!.setOutOfService(
			{ vesselId: Number(params.vesselId), shaftId: Number(params.shaftId), type: parsed.data.type },
			parsed.data.out_of_service,
			parsed.data.reason,
			actorOf(user)
		);
		return { service: { type: parsed.data.type, reason: '', errors: {} as Record<string, string> } };
	}
};
