import { readQuery, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { shaftCompliance } from '$lib/server/history/compliance';
import { complianceQuery } from '$lib/server/history/query';
import { shaftOfPath } from '$lib/server/history/route-helpers';

/** Compliance of a shaft over [from, to), with its alarms and purges (items=0 leaves the lists out). */
export const GET = route(async (event) => {
	const q = readQuery(event.url, complianceQuery);
	const ctx = context();
	const h = await shaftOfPath(ctx, event.params);
	return shaftCompliance(ctx.db, {
		shaftId: h.shaft.id,
		vesselId: h.vessel.id,
		from: q.from,
		to: q.to,
		now: Date.now(),
		gapMs: h.gapMs,
		minimums: h.minimums,
		items: q.items !== '0'
	});
});
