import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import { can } from '$lib/permissions';
import { pageUser } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { getVessel } from '$lib/server/fleet/repository';
import { listImports } from '$lib/server/history/imports/repository';
import { MAX_UPLOAD_BYTES } from '$lib/history/import/sniff';

export const load: PageServerLoad = async ({ params, locals }) => {
	const user = pageUser(locals);
	const vessel = await getVessel(context().db, Number(params.vesselId));
	if (!vessel) error(404, 'Not found');
	return {
		vessel,
		imports: await listImports(context().db, { vesselId: vessel.id }),
		canUpload: can(user.role, 'history.upload'),
		maxBytes: MAX_UPLOAD_BYTES
	};
};
