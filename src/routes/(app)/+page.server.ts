import type { PageServerLoad } from './$types';
import { context } from '$lib/server/context';
import { visibleVesselIds } from '$lib/server/auth/guard';
import { pageUser } from '$lib/server/auth/page-guard';
import { fleetWithState } from '$lib/server/fleet/state';

export const load: PageServerLoad = async ({ locals }) => {
	const user = pageUser(locals);
	return { vessels: await fleetWithState(context(), visibleVesselIds(user)) };
};
