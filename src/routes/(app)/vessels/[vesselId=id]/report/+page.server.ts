import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import { pageUser } from '$lib/server/auth/page-guard';
import { context } from '$lib/server/context';
import { getVessel } from '$lib/server/fleet/repository';
import { shaftCompliance } from '$lib/server/history/compliance';
import { historyOf } from '$lib/server/history/shaft-context';
import { periodFromQuery } from '$lib/history/range';
import { ROLE_LABELS } from '$lib/types';
import { recordsSummary } from '$lib/server/records/repository';

/** The report's figures are computed here, so the page prints complete without waiting on a fetch. */
export const load: PageServerLoad = async ({ params, locals, url }) => {
	const user = pageUser(locals);
	const ctx = context();
	const vessel = await getVessel(ctx.db, Number(params.vesselId));
	if (!vessel) error(404, 'Not found');
	const now = Date.now();
	const period = periodFromQuery(url.searchParams, now, '30d');
	const only = url.searchParams.get('shaft');
	const shafts = vessel.shafts.filter((s) => !only || String(s.id) === only);
	const rows = [];
	for (const shaft of shafts.length ? shafts : vessel.shafts) {
		const h = historyOf(ctx, shaft, vessel);
		rows.push({
			shaft,
			compliance: await shaftCompliance(ctx.db, {
				shaftId: shaft.id,
				vesselId: vessel.id,
				from: period.from,
				to: period.to,
				now,
				gapMs: h.gapMs,
				minimums: h.minimums,
				items: true
			}),
			records: await recordsSummary(ctx.db, shaft.id)
		});
	}
	return {
		vessel,
		period,
		only: shafts.length === 1 && only ? shafts[0].id : null,
		rows,
		produced: { at: now, by: user.name, email: user.email, role: ROLE_LABELS[user.role] }
	};
};
