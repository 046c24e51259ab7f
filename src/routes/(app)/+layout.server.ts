import type { LayoutServerLoad } from './$types';
import { pageUser } from '$lib/server/auth/page-guard';

export const load: LayoutServerLoad = async ({ locals }) => {
	return { user: pageUser(locals) };
};
