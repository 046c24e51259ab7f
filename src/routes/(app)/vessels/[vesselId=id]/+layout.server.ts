import { error } from '@sveltejs/kit';
import type { LayoutServerLoad } from './$types';
import { context } from '$lib/server/context';
import { getVessel } from '$lib/server/fleet/repository';

/** Hooks has checked the vessel is in the user's scope; here it is only read. */
export const load: LayoutServerLoad = async ({ params }) => {
	const vessel = await getVessel(context().db, Number(params.vesselId));
	if (!vessel) error(404, 'Not found');
	return { vessel };
};
