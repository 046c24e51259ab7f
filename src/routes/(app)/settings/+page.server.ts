import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { ApiError, fieldErrors } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pageUser } from '$lib/server/auth/page-guard';
import { startSession } from '$lib/server/auth/session';
import { listTokens } from '$lib/server/auth/tokens';
import { context } from '$lib/server/context';
import { createApiToken, revokeApiToken, setUnits } from '$lib/server/admin/my-account';
import { changeOwnPassword } from '$lib/server/users/service';
import { seesWholeFleet } from '$lib/permissions';
import { passwordChange, unitsUpdate } from '$lib/schemas/users';

const tokenName = z.object({
	name: z.string().trim().min(1, 'give it a name, such as the system that will use it').max(80)
});

const text = (form: FormData, name: string) => {
	const v = form.get(name);
	return typeof v === 'string' ? v : '';
};

export const load: PageServerLoad = async ({ locals }) => {
	const user = pageUser(locals);
	const { db } = context();
	return {
		wholeFleet: seesWholeFleet(user.role),
		memberOf: user.vessel_ids.length
			? await db
					.selectFrom('vessels')
					.select(['id', 'name'])
					.where('id', 'in', user.vessel_ids)
					.orderBy('name')
					.execute()
			: [],
		tokens: await listTokens(db, user.id)
	};
};

export const actions: Actions = {
	units: async ({ locals, request }) => {
		const user = pageUser(locals);
		const parsed = unitsUpdate.safeParse({ units: text(await request.formData(), 'units') });
		const scope = 'units';
		if (!parsed.success)
			return fail(400, { scope, errors: { units: 'choose metric or US customary' } });
		await setUnits(context(), actorOf(user), user.id, parsed.data.units);
		return { scope, saved: true };
	},

	password: async (event) => {
		const user = pageUser(event.locals);
		const form = await event.request.formData();
		const scope = 'password';
		const input = {
			current_password: text(form, 'current_password'),
			new_password: text(form, 'new_password')
		};
		const errors: Record<string, string> = {};
		const parsed = passwordChange.safeParse(input);
		if (!parsed.success) Object.assign(errors, fieldErrors(parsed.error));
		if (!errors.new_password && input.new_password !== text(form, 'new_password_again')) {
			errors.new_password_again = 'not the same as the new password';
		}
		if (!parsed.success || Object.keys(errors).length) return fail(400, { scope, errors });
		const ctx = context();
		try {
			// signs the user out everywhere, this browser included …
			await changeOwnPassword(
				ctx,
				actorOf(user),
				user.id,
				input.current_password,
				input.new_password
			);
		} catch (err) {
			if (!(err instanceof ApiError)) throw err;
			return fail(err.status, { scope, errors: err.fields ?? { _: err.message } });
		}
		// … so this browser gets a fresh session and stays signed in
		if (event.locals.session) await startSession(ctx.lucia, user.id, event.cookies, event.url);
		return { scope, saved: true };
	},

	createToken: async ({ locals, request, setHeaders }) => {
		const user = pageUser(locals);
		const scope = 'new-token';
		const values = { name: text(await request.formData(), 'name') };
		const parsed = tokenName.safeParse(values);
		if (!parsed.success) return fail(400, { scope, values, errors: fieldErrors(parsed.error) });
		const token = await createApiToken(context(), actorOf(user), user.id, parsed.data.name);
		// the token is in this answer and nowhere else: no cache may keep a copy
		setHeaders({ 'cache-control': 'no-store' });
		return { scope, token };
	},

	revokeToken: async ({ locals, request }) => {
		const user = pageUser(locals);
		const scope = 'tokens';
		const id = Number(text(await request.formData(), 'id'));
		if (
			!Number.isSafeInteger(id) ||
			!(await revokeApiToken(context(), actorOf(user), user.id, id))
		) {
			return fail(404, {
				scope,
				errors: { _: 'No such token of yours, or it is already revoked.' }
			});
		}
		return { scope, message: 'Token revoked: it no longer works.' };
	}
};
