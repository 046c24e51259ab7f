/** What a live stream sends first: the recent window, so a chart is full at once. */
import type { AppContext } from '../context';
import { listAlarms } from '../alarms/queries';

/** [ts, flow_lpm, supply_bar, temp_c, shaft_rpm] — compact, as charts want columns anyway */
export type SampleTuple = [number, number, number | null, number | null, number | null];
/** [ts, dp_bar, purge_valve] */
export type SeparatorTuple = [number, number | null, 'open' | 'closed' | null];

export async function samplesSince(ctx: AppContext, vesselId: number, fromMs: number) {
	const shafts = await ctx.db.selectFrom('shafts').select('id').where('vessel_id', '=', vesselId).execute();
	const out: Record<number, SampleTuple[]> = {};
	for (const { id } of shafts) {
		const rows = await ctx.db
			.selectFrom('samples')
			.select(['ts', 'flow_lpm', 'supply_bar', 'temp_c', 'shaft_rpm'])
			.where('shaft_id', '=', id)
			.where('ts', '>=', fromMs)
			.orderBy('ts')
			.execute();
		out[id] = rows.map((r) => [r.ts, r.flow_lpm, r.supply_bar, r.temp_c, r.shaft_rpm]);
	}
	const separator = await ctx.db
		.selectFrom('separator_states')
		.select(['ts', 'dp_bar', 'purge_valve'])
		.where('vessel_id', '=', vesselId)
		.where('ts', '>=', fromMs)
		.orderBy('ts')
		.execute();
	return {
		shafts: out,
		separator: separator.map((r): SeparatorTuple => [r.ts, r.dp_bar, r.purge_valve])
	};
}

export async function vesselSnapshot(ctx: AppContext, vesselId: number, windowMs: number) {
	const now = Date.now();
	const from = now - windowMs;
	const data = await samplesSince(ctx, vesselId, from);
	const purges = await ctx.db
		.selectFrom('valve_events')
		.select(['opened_at', 'closed_at', 'dp_before_bar'])
		.where('vessel_id', '=', vesselId)
		.where((eb) => eb.or([eb('closed_at', 'is', null), eb('closed_at', '>=', from)]))
		.orderBy('opened_at')
		.execute();
	const alarms = await listAlarms(ctx.db, { vesselIds: [vesselId], state: 'active' });
	const gateway = ctx.services.telemetry?.pipeline.gateway.get(vesselId) ?? null;
	return { vessel_id: vesselId, now, window_s: windowMs / 1000, ...data, purges, alarms, gateway };
}
