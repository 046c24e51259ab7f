import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { can } from '$lib/permissions';
import { purgeScheduleInput } from '$lib/purge';
import { ApiError, fieldErrors } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pageUser } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { purgeNowInput, purgeService } from '$lib/server/purge/api';
import { pageRange, separatorPage } from '$lib/server/purge/page';
import { changedSettings, SEPARATOR_SETTING_KEYS, toFormValue } from '$lib/alarms/settings-form';

export const load: PageServerLoad = async ({ locals, params, url, depends }) => {
	const user = pageUser(locals);
	depends('aftwater:purge');
	const page = await separatorPage(
		context(),
		Number(params.vesselId),
		pageRange(url.searchParams.get('range'))
	);
	const settings = context().services.alarms!.settings.forVessel(Number(params.vesselId));
	return {
		...page,
		alarmSettingsForm: Object.fromEntries(SEPARATOR_SETTING_KEYS.map((k) => [k, toFormValue(k, settings[k], user.units)])),
		may: {
			schedule: can(user.role, 'purge.schedule'),
			purge: can(user.role, 'purge.now'),
			alarmSettings: can(user.role, 'alarm.settings')
		}
	};
};

/** A number field: empty stays undefined (so "required" is said), text stays text (so the type is). */
function numberField(form: FormData, name: string): unknown {
	const raw = String(form.get(name) ?? '').trim();
	if (raw === '') return undefined;
	return /^-?\d+(\.\d+)?$/.test(raw) ? Number(raw) : raw;
}

/** The form's fields → the API's body, so both are judged by the one schema. */
function scheduleFromForm(form: FormData) {
	const froms = form.getAll('quiet_from').map(String);
	const tos = form.getAll('quiet_to').map(String);
	return {
		enabled: form.get('enabled') === 'on',
		interval_min: numberField(form, 'interval_min'),
		duration_s: numberField(form, 'duration_s'),
		offset_min: numberField(form, 'offset_min') ?? 0,
		quiet_hours: froms.map((from, i) => ({ from, to: tos[i] ?? '' })),
		reason: String(form.get('reason') ?? '')
	};
}

export const actions: Actions = {
	schedule: async ({ locals, params, request }) => {
		const user = pageUser(locals);
		if (!can(user.role, 'purge.schedule')) {
			return fail(403, {
				action: 'schedule' as const,
				errors: { _: 'Your role may not change the purge schedule.' }
			});
		}
		const values = scheduleFromForm(await request.formData());
		const parsed = purgeScheduleInput.safeParse(values);
		if (!parsed.success)
			return fail(422, { action: 'schedule' as const, values, errors: fieldErrors(parsed.error) });
		try {
			const result = await purgeService(context()).setSchedule(
				Number(params.vesselId),
				parsed.data,
				actorOf(user)
			);
			return { action: 'schedule' as const, saved: true, changed: result.changed };
		} catch (err) {
			if (err instanceof ApiError) {
				return fail(err.status, {
					action: 'schedule' as const,
					values,
					errors: err.fields ?? { _: err.message }
				});
			}
			throw err;
		}
	},

	purge: async ({ locals, params, request }) => {
		const user = pageUser(locals);
		if (!can(user.role, 'purge.now')) {
			return fail(403, { action: 'purge' as const, error: 'Your role may not start a purge.' });
		}
		const form = await request.formData();
		const parsed = purgeNowInput.safeParse({ duration_s: numberField(form, 'duration_s') });
		if (!parsed.success) {
			return fail(422, {
				action: 'purge' as const,
				error: `Duration: ${fieldErrors(parsed.error).duration_s}`
			});
		}
		try {
			const command = await purgeService(context()).purgeNow(
				Number(params.vesselId),
				actorOf(user),
				parsed.data.duration_s
			);
			return { action: 'purge' as const, command };
		} catch (err) {
			if (err instanceof ApiError)
				return fail(err.status, { action: 'purge' as const, error: err.message });
			throw err;
		}
	},

	alarmSettings: async ({ locals, params, request }) => {
		const user = pageUser(locals);
		if (!can(user.role, 'alarm.settings')) {
			return fail(403, { action: 'alarmSettings' as const, errors: { _: 'Your role may not change alarm settings.' } });
		}
		const ctx = context();
		const vesselId = Number(params.vesselId);
		const store = ctx.services.alarms!.settings;
		const { update, errors } = changedSettings(await request.formData(), store.forVessel(vesselId), user.units, SEPARATOR_SETTING_KEYS);
		if (Object.keys(errors).length) return fail(400, { action: 'alarmSettings' as const, errors });
		try {
			await store.update({ vesselId }, update, actorOf(user));
		} catch (err) {
			if (err instanceof ApiError) return fail(400, { action: 'alarmSettings' as const, errors: err.fields ?? { _: err.message } });
			throw err;
		}
		ctx.events.emit('config.changed', { vesselId });
		return { action: 'alarmSettings' as const, saved: true };
	}
};
