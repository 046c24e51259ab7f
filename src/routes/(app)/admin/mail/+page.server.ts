import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ApiError } from '$lib/server/api/errors';
import { actorOf } from '$lib/server/audit';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { listSink, outboxOverview, retryFailedMail, transportInfo } from '$lib/server/mail/admin';

export const load: PageServerLoad = async ({ locals }) => {
	pagePermission(locals, 'system.read');
	const ctx = context();
	return {
		transport: transportInfo(ctx.services.mail),
		outbox: await outboxOverview(ctx.db, 50),
		sink: await listSink(ctx.db, { limit: 100 })
	};
};

export const actions: Actions = {
	retry: async ({ locals, request }) => {
		const user = pagePermission(locals, 'system.read');
		const id = Number((await request.formData()).get('id'));
		if (!Number.isSafeInteger(id) || id < 1) return fail(400, { error: 'no such message' });
		try {
			await retryFailedMail(context(), actorOf(user), id);
		} catch (err) {
			if (err instanceof ApiError) return fail(err.status, { error: err.message });
			throw err;
		}
		return { retried: id };
	}
};
