import { readQuery, route, userOf } from '$lib/server/api/handler';
import { ApiError } from '$lib/server/api/errors';
import { context } from '$lib/server/context';
import { canSeeVessel, visibleVesselIds } from '$lib/server/auth/guard';
import { listAlarms } from '$lib/server/alarms/queries';
import { alarmListQuery } from '$lib/schemas/alarms';
import { parseInstant } from '$lib/server/api/time';

/** Alarms of the vessels the caller may see: active (not normal, the default), all, or in one ISA-18.2 state. */
export const GET = route(async (event) => {
	const user = userOf(event);
	const q = readQuery(event.url, alarmListQuery);
	const ctx = context();
	let vesselId: number | undefined;
	if (q.vessel !== undefined) {
		const vessel = await ctx.db
			.selectFrom('vessels')
			.select('id')
			.where((eb) => (/^\d+$/.test(q.vessel!) ? eb('id', '=', Number(q.vessel)) : eb('code', '=', q.vessel!)))
			.executeTakeFirst();
		if (!vessel || !canSeeVessel(user, vessel.id)) throw new ApiError(404, 'not_found', 'vessel not found');
		vesselId = vessel.id;
	}
	const alarms = await listAlarms(ctx.db, {
		vesselIds: visibleVesselIds(user),
		state: q.state,
		vesselId,
		from: q.from === undefined ? undefined : parseInstant(q.from, 'from'),
		to: q.to === undefined ? undefined : parseInstant(q.to, 'to'),
		limit: q.limit
	});
	return { alarms };
});
