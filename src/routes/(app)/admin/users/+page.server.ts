import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import * as users from '$lib/server/users/repository';
import { createUser } from '$lib/server/users/service';
import { userCreateForm } from './forms';

export const load: PageServerLoad = async ({ locals }) => {
	pagePermission(locals, 'users.manage');
	const { db } = context();
	return {
		users: await users.list(db),
		vessels: await db.selectFrom('vessels').select(['id', 'code', 'name']).orderBy('name').execute()
	};
};

export const actions: Actions = {
	create: async ({ locals, request }) => {
		const admin = pagePermission(locals, 'users.manage');
		const parsed = userCreateForm(await request.formData());
		const scope = 'new-user';
		const { values, vesselIds } = parsed;
		if (!parsed.ok) return fail(400, { scope, values, vesselIds, errors: parsed.errors });
		try {
			const user = await createUser(context(), actorOf(admin), parsed.data);
			return {
				scope,
				saved: true,
				created: { id: user.id, email: user.email, invited: !parsed.data.password }
			};
		} catch (err) {
			if (!(err instanceof ApiError)) throw err;
			const errors =
				err.status === 409
					? { email: 'Another user already has this e-mail address.' }
					: (err.fields ?? { _: err.message });
			return fail(err.status, { scope, values, vesselIds, errors });
		}
	}
};
