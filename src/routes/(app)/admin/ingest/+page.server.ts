import type { PageServerLoad } from './$types';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { listRejected } from '$lib/server/admin/rejected-log';
import { healthReport } from '$lib/server/health';

const PAGE_SIZE = 50;

export const load: PageServerLoad = async ({ locals, url }) => {
	pagePermission(locals, 'system.read');
	const ctx = context();
	const page = Number(url.searchParams.get('page'));
	return {
		// the very figures GET /api/health reports, so the page and a monitor never disagree
		health: await healthReport(ctx),
		rejected: await listRejected(ctx.db, {
			page: Number.isSafeInteger(page) && page > 0 ? page : 1,
			pageSize: PAGE_SIZE
		}),
		rejectedLogSize: ctx.config.REJECTED_LOG_SIZE,
		clockSteps: [...(ctx.services.telemetry?.pipeline.clockSteps ?? [])]
	};
};
