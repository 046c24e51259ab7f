import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pagePermission, pageUser } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { can } from '$lib/permissions';
import { overview, parseSettingsUpdate, saveSettings } from '$lib/server/notify/settings';

export const load: PageServerLoad = async ({ locals, params }) => {
	const user = pageUser(locals);
	return {
		overview: await overview(context().db, Number(params.vesselId)),
		canEdit: can(user.role, 'notifications.settings')
	};
};

/** A whole number typed in the form, or the text itself so the schema names what is wrong. */
function numberField(form: FormData, name: string): number | string {
	const raw = String(form.get(name) ?? '').trim();
	return /^-?\d+(\.\d+)?$/.test(raw) ? Number(raw) : raw;
}

export const actions: Actions = {
	default: async ({ locals, params, request }) => {
		const user = pagePermission(locals, 'notifications.settings');
		const form = await request.formData();
		const values = {
			escalation_after_s: numberField(form, 'escalation_after_s'),
			incident_holdoff_s: numberField(form, 'incident_holdoff_s')
		};
		try {
			const update = parseSettingsUpdate(values);
			await saveSettings(context().db, actorOf(user), Number(params.vesselId), update);
		} catch (err) {
			if (err instanceof ApiError)
				return fail(400, { values, errors: err.fields ?? { _: err.message } });
			throw err;
		}
		return { saved: true };
	}
};
