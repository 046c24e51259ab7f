import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { sendAccountLink } from '$lib/server/account/service';
import * as users from '$lib/server/users/repository';
import { updateUser } from '$lib/server/users/service';
import { userUpdateForm } from '../forms';

export const load: PageServerLoad = async ({ locals, params }) => {
	const admin = pagePermission(locals, 'users.manage');
	const { db } = context();
	const row = await users.findById(db, params.userId);
	if (!row) error(404, 'No such user');
	const user = await users.toAppUser(db, row);
	return {
		account: {
			...user,
			disabled: row.disabled_at !== null,
			disabled_at: row.disabled_at,
			has_password: row.password_hash !== null,
			password_changed_at: row.password_changed_at,
			created_at: row.created_at
		},
		self: admin.id === user.id,
		vessels: await db.selectFrom('vessels').select(['id', 'code', 'name']).orderBy('name').execute()
	};
};

/** A refusal of the users or account service as this page's message. */
function refused(err: unknown, scope: string, extra: Record<string, unknown> = {}) {
	if (!(err instanceof ApiError)) throw err;
	return fail(err.status, { scope, message: err.message, errors: err.fields ?? {}, ...extra });
}

export const actions: Actions = {
	update: async ({ locals, params, request }) => {
		const admin = pagePermission(locals, 'users.manage');
		const parsed = userUpdateForm(await request.formData());
		const scope = 'user';
		const { values, vesselIds } = parsed;
		if (!parsed.ok) return fail(400, { scope, values, vesselIds, errors: parsed.errors });
		try {
			await updateUser(context(), actorOf(admin), params.userId, parsed.data);
		} catch (err) {
			return refused(err, scope, { values, vesselIds });
		}
		return { scope, saved: true };
	},

	disable: async ({ locals, params }) => {
		const admin = pagePermission(locals, 'users.manage');
		try {
			// updateUser ends every session of the user: signed out at their next request
			await updateUser(context(), actorOf(admin), params.userId, { disabled: true });
		} catch (err) {
			return refused(err, 'status');
		}
		return { scope: 'status', message: 'Disabled: signed out everywhere, and cannot sign in.' };
	},

	enable: async ({ locals, params }) => {
		const admin = pagePermission(locals, 'users.manage');
		try {
			await updateUser(context(), actorOf(admin), params.userId, { disabled: false });
		} catch (err) {
			return refused(err, 'status');
		}
		return { scope: 'status', message: 'Enabled: they can sign in again.' };
	},

	sendLink: async ({ locals, params }) => {
		const admin = pagePermission(locals, 'users.manage');
		try {
			const sent = await sendAccountLink(context(), actorOf(admin), params.userId);
			return {
				scope: 'link',
				message:
					sent.kind === 'invitation'
						? 'They never set a password, so a new invitation is on its way by e-mail.'
						: 'A password-reset link is on its way by e-mail.'
			};
		} catch (err) {
			return refused(err, 'link');
		}
	}
};
