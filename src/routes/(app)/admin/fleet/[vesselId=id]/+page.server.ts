import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { gatewayConnection } from '$lib/server/admin/gateway-connection';
import { getShaft, getVessel } from '$lib/server/fleet/repository';
import {
	createShaft,
	gatewayInfo,
	issueGatewayCredentials,
	updateShaft,
	updateVessel
} from '$lib/server/fleet/service';
import { shaftCreateForm, shaftUpdateForm, vesselUpdateForm } from '../forms';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	pagePermission(locals, 'fleet.configure');
	const ctx = context();
	const vessel = await getVessel(ctx.db, Number(params.vesselId));
	if (!vessel) error(404, 'No such vessel');
	return {
		vessel,
		gateway: (await gatewayInfo(ctx, vessel.id)) ?? null,
		connection: gatewayConnection(ctx, vessel.code, url),
		zones: ['UTC', ...Intl.supportedValuesOf('timeZone')],
		created: url.searchParams.has('created')
	};
};

/** A service's refusal as a form answer; anything else is a server fault and goes up. */
function refused(err: unknown, scope: string, values: Record<string, string>) {
	if (!(err instanceof ApiError)) throw err;
	return fail(err.status, { scope, values, errors: err.fields ?? { _: err.message } });
}

export const actions: Actions = {
	updateVessel: async ({ locals, params, request }) => {
		const user = pagePermission(locals, 'fleet.configure');
		const parsed = vesselUpdateForm(await request.formData());
		const scope = 'vessel';
		if (!parsed.ok) return fail(400, { scope, values: parsed.values, errors: parsed.errors });
		try {
			await updateVessel(context(), actorOf(user), Number(params.vesselId), parsed.data);
		} catch (err) {
			return refused(err, scope, parsed.values);
		}
		return { scope, saved: true };
	},

	createShaft: async ({ locals, params, request }) => {
		const user = pagePermission(locals, 'fleet.configure');
		const parsed = shaftCreateForm(await request.formData(), user.units);
		const scope = 'new-shaft';
		if (!parsed.ok) return fail(400, { scope, values: parsed.values, errors: parsed.errors });
		try {
			await createShaft(context(), actorOf(user), Number(params.vesselId), parsed.data);
		} catch (err) {
			if (err instanceof ApiError && err.status === 409) {
				return fail(409, {
					scope,
					values: parsed.values,
					errors: {
						code: `This vessel already has a shaft with the code “${parsed.data.code}”. The code is part of the shaft’s telemetry topic, so each shaft of a vessel needs its own.`
					}
				});
			}
			return refused(err, scope, parsed.values);
		}
		return { scope, saved: true };
	},

	updateShaft: async ({ locals, params, request }) => {
		const user = pagePermission(locals, 'fleet.configure');
		const form = await request.formData();
		const shaftId = Number(form.get('shaft_id'));
		const before = Number.isSafeInteger(shaftId)
			? await getShaft(context().db, shaftId)
			: undefined;
		// a shaft of another vessel is not this page's to change
		if (!before || before.vessel_id !== Number(params.vesselId)) {
			return fail(404, { scope: 'page', message: 'That shaft is not on this vessel.' });
		}
		const scope = `shaft-${before.id}`;
		const parsed = shaftUpdateForm(form, user.units, before);
		if (!parsed.ok) return fail(400, { scope, values: parsed.values, errors: parsed.errors });
		try {
			await updateShaft(context(), actorOf(user), before.id, parsed.data);
		} catch (err) {
			return refused(err, scope, parsed.values);
		}
		return { scope, saved: true };
	},

	rotateGateway: async ({ locals, params, request, setHeaders }) => {
		const user = pagePermission(locals, 'fleet.configure');
		const scope = 'gateway';
		if ((await request.formData()).get('confirm') !== 'rotate') {
			return fail(400, {
				scope,
				message: 'Confirm first: new credentials disconnect the gateway until it has them.'
			});
		}
		const credentials = await issueGatewayCredentials(
			context(),
			actorOf(user),
			Number(params.vesselId)
		);
		// the password is in this answer and nowhere else: no cache may keep a copy
		setHeaders({ 'cache-control': 'no-store' });
		return { scope, credentials };
	}
};
