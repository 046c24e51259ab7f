import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { context } from '$lib/server/context';
import { pagePermission } from '$lib/server/auth/page-guard';
import { actorOf } from '$lib/server/audit';
import { setOperatingMode } from '$lib/server/fleet/service';
import { fieldErrors } from '$lib/server/api/errors';
import { operatingModeUpdate } from '$lib/schemas/fleet';
import { separatorLimits, shaftLimits } from '$lib/server/alarms/limits';

export const load: PageServerLoad = async ({ parent }) => {
	const { vessel } = await parent();
	const ctx = context();
	return {
		limits: Object.fromEntries(vessel.shafts.map((s) => [s.id, shaftLimits(ctx, s)])),
		separatorLimits: separatorLimits(ctx, vessel.id)
	};
};

export const actions: Actions = {
	mode: async ({ locals, params, request }) => {
		const user = pagePermission(locals, 'vessel.operating_mode');
		const form = await request.formData();
		const parsed = operatingModeUpdate.safeParse({ operating_mode: form.get('operating_mode'), reason: form.get('reason') });
		if (!parsed.success) return fail(400, { mode: { errors: fieldErrors(parsed.error), saved: false } });
		await setOperatingMode(context(), actorOf(user), Number(params.vesselId), parsed.data.operating_mode, parsed.data.reason);
		return { mode: { errors: {} as Record<string, string>, saved: true } };
	}
};
