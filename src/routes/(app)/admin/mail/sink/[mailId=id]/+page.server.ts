import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { getSinkMessage } from '$lib/server/mail/admin';

export const load: PageServerLoad = async ({ locals, params }) => {
	pagePermission(locals, 'system.read');
	const message = await getSinkMessage(context().db, Number(params.mailId));
	if (!message) error(404, 'The sink has no such message (it keeps only the newest ones).');
	return { message };
};
