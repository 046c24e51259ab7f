import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ApiError, fieldErrors } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pageUser } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import {
	getPreferences,
	isOnboard,
	preferencesUpdate,
	savePreferences
} from '$lib/server/mail/preferences';

export const load: PageServerLoad = async ({ locals }) => {
	const user = pageUser(locals);
	return {
		preferences: await getPreferences(context().db, user.id),
		onboard: isOnboard(user.role),
		zones: ['UTC', ...Intl.supportedValuesOf('timeZone')]
	};
};

/** The form's fields → the API's shape, so both are validated by one schema. */
function fromForm(form: FormData, onboard: boolean) {
	const notify = form.getAll('notify').map(String);
	// alarm priority cannot be switched off on board: the box is shown ticked and disabled
	if (onboard && !notify.includes('alarm')) notify.push('alarm');
	const digest = String(form.get('digest_hour') ?? '');
	const quiet = form.get('quiet') === 'on';
	return {
		units: String(form.get('units') ?? ''),
		notify_priorities: notify,
		digest_hour: digest === '' ? null : Number(digest),
		quiet_hours: quiet
			? { from: String(form.get('quiet_from') ?? ''), to: String(form.get('quiet_to') ?? '') }
			: null,
		time_zone: String(form.get('time_zone') ?? '').trim()
	};
}

export const actions: Actions = {
	default: async ({ locals, request }) => {
		const user = pageUser(locals);
		const values = fromForm(await request.formData(), isOnboard(user.role));
		const parsed = preferencesUpdate.safeParse(values);
		if (!parsed.success) return fail(400, { values, errors: fieldErrors(parsed.error) });
		try {
			await savePreferences(context(), actorOf(user), user, parsed.data);
		} catch (err) {
			if (err instanceof ApiError)
				return fail(400, { values, errors: err.fields ?? { _: err.message } });
			throw err;
		}
		return { saved: true };
	}
};
