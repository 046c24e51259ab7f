import type { PageServerLoad } from './$types';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { auditActions, listAuditLog } from '$lib/server/admin/audit-log';

const PAGE_SIZE = 50;

/** A positive whole number from the query, else null (a hand-edited URL is not an error). */
function positive(value: string | null): number | null {
	const n = Number(value);
	return value !== null && Number.isSafeInteger(n) && n > 0 ? n : null;
}

export const load: PageServerLoad = async ({ locals, url }) => {
	pagePermission(locals, 'system.read');
	const { db } = context();
	const vesselId = positive(url.searchParams.get('vessel'));
	const action = url.searchParams.get('action')?.trim() || null;
	const log = await listAuditLog(db, {
		vesselId,
		action,
		page: positive(url.searchParams.get('page')) ?? 1,
		pageSize: PAGE_SIZE
	});
	return {
		log,
		filter: { vesselId, action },
		actions: await auditActions(db),
		vessels: await db.selectFrom('vessels').select(['id', 'name']).orderBy('name').execute()
	};
};
