import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import { can } from '$lib/permissions';
import { pageUser } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { getVessel } from '$lib/server/fleet/repository';

/** The vessel and its shafts; the history itself is fetched by the page through the API. */
export const load: PageServerLoad = async ({ params, locals }) => {
	const user = pageUser(locals);
	const vessel = await getVessel(context().db, Number(params.vesselId));
	if (!vessel) error(404, 'Not found');
	return { vessel, canUpload: can(user.role, 'history.upload') };
};
