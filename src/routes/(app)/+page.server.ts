import type { PageServerLoad } from './$types';
import { context } from '$lib/server/context';
import { visibleVesselIds } from '$lib/server/auth/guard';
import { pageUser } from '$lib/server/auth/page-guard';
import { fleetWithState } from '$lib/server/fleet/state';

const TREND_MS = 10 * 60_000;
const TREND_POINTS = 60;

export const load: PageServerLoad = async ({ locals }) => {
	const user = pageUser(locals);
	const ctx = context();
	const vessels = await fleetWithState(ctx, visibleVesselIds(user));
	// the trend line starts full: the last ten minutes, thinned to about a point every 10 s
	const since = Date.now() - TREND_MS;
	const trends: Record<number, [number, number][]> = {};
	for (const v of vessels) {
		for (const s of v.shafts) {
			const rows = await ctx.db
				.selectFrom('samples')
				.select(['ts', 'flow_lpm'])
				.where('shaft_id', '=', s.id)
				.where('ts', '>=', since)
				.orderBy('ts')
				.execute();
			const step = Math.max(1, Math.floor(rows.length / TREND_POINTS));
			trends[s.id] = rows.filter((_, i) => i % step === 0).map((r) => [r.ts, r.flow_lpm]);
		}
	}
	return { vessels, trends };
};
