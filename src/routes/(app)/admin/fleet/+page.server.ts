import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { listVessels } from '$lib/server/fleet/repository';
import { createVessel } from '$lib/server/fleet/service';
import { vesselCreateForm } from './forms';

export const load: PageServerLoad = async ({ locals }) => {
	pagePermission(locals, 'fleet.configure');
	const { db } = context();
	const gateways = await db
		.selectFrom('gateways')
		.select(['vessel_id', 'username', 'issued_at'])
		.execute();
	return {
		vessels: await listVessels(db, 'all'),
		gateways: Object.fromEntries(gateways.map((g) => [g.vessel_id, g])),
		zones: ['UTC', ...Intl.supportedValuesOf('timeZone')]
	};
};

export const actions: Actions = {
	createVessel: async ({ locals, request }) => {
		const user = pagePermission(locals, 'fleet.configure');
		const parsed = vesselCreateForm(await request.formData());
		if (!parsed.ok) return fail(400, { values: parsed.values, errors: parsed.errors });
		let id: number;
		try {
			id = (await createVessel(context(), actorOf(user), parsed.data)).id;
		} catch (err) {
			if (err instanceof ApiError && err.status === 409) {
				return fail(409, {
					values: parsed.values,
					errors: {
						code: `Another vessel already has the code “${parsed.data.code}”. The code is part of the gateway’s MQTT topics, so each vessel needs its own.`
					}
				});
			}
			throw err;
		}
		// next: the new vessel's shafts and gateway
		redirect(303, `/admin/fleet/${id}?created=1`);
	}
};
