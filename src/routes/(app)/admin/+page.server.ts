import type { PageServerLoad } from './$types';
import { pagePermission } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { healthReport } from '$lib/server/health';

export const load: PageServerLoad = async ({ locals }) => {
	pagePermission(locals, 'system.read');
	const ctx = context();
	const count = async (table: 'vessels' | 'shafts' | 'gateways') =>
		Number(
			(
				await ctx.db
					.selectFrom(table)
					.select((eb) => eb.fn.countAll<number>().as('n'))
					.executeTakeFirstOrThrow()
			).n
		);
	const users = await ctx.db.selectFrom('users').select('disabled_at').execute();
	const health = await healthReport(ctx);
	return {
		summary: {
			vessels: await count('vessels'),
			shafts: await count('shafts'),
			gateways: await count('gateways'),
			users: users.filter((u) => u.disabled_at === null).length,
			disabled: users.filter((u) => u.disabled_at !== null).length,
			ingest: health.status,
			rejected: health.ingest.rejected_total
		}
	};
};
