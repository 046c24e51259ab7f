import type { LayoutServerLoad } from './$types';
import { pageUser } from '$lib/server/auth/page-guard';
import { visibleVesselIds } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import { listVessels } from '$lib/server/fleet/repository';

export const load: LayoutServerLoad = async ({ locals }) => {
	const user = pageUser(locals);
	// names for the alarm banner on every page
	const vessels = (await listVessels(context().db, visibleVesselIds(user))).map((v) => ({
		id: v.id,
		name: v.name,
		time_zone: v.time_zone,
		shafts: v.shafts.map((s) => ({ id: s.id, name: s.name }))
	}));
	return { user, fleet: vessels };
};
