import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import { can } from '$lib/permissions';
import { pageUser } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { getVessel } from '$lib/server/fleet/repository';
import { getImport } from '$lib/server/history/imports/repository';
import { importTable } from '$lib/server/history/imports/service';

/** One upload: its record and report, and the head of the file for the mapping step. */
export const load: PageServerLoad = async ({ params, locals }) => {
	const user = pageUser(locals);
	const ctx = context();
	const vessel = await getVessel(ctx.db, Number(params.vesselId));
	const view = await getImport(ctx.db, Number(params.importId));
	// hooks checked the vessel; an import of another vessel is not found under this one
	if (!vessel || !view || view.vessel_id !== vessel.id) error(404, 'Not found');
	return {
		vessel,
		import: view,
		table: await importTable(ctx, view),
		shaft: vessel.shafts.find((s) => s.id === view.shaft_id) ?? null,
		canUpload: can(user.role, 'history.upload'),
		zones: ['UTC', ...Intl.supportedValuesOf('timeZone')]
	};
};
