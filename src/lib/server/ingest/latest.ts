/** The newest sample, separator state and gateway status, read once at start-up. */
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import type { IngestPipeline } from './pipeline';

export async function loadLatest(db: Kysely<Database>, pipeline: IngestPipeline) {
	for (const shaft of pipeline.registry.shafts()) {
		const row = await db
			.selectFrom('samples')
			.selectAll()
			.where('shaft_id', '=', shaft.id)
			.orderBy('ts', 'desc')
			.limit(1)
			.executeTakeFirst();
		if (row) {
			pipeline.latestSample.set(shaft.id, {
				shaft,
				ts: row.ts,
				flow_lpm: row.flow_lpm,
				supply_bar: row.supply_bar,
				temp_c: row.temp_c,
				shaft_rpm: row.shaft_rpm,
				newest: true,
				origin: 'live',
				clockStepped: false
			});
		}
	}
	for (const vessel of pipeline.registry.vessels()) {
		const state = await db
			.selectFrom('separator_states')
			.select(['ts'])
			.where('vessel_id', '=', vessel.id)
			.orderBy('ts', 'desc')
			.limit(1)
			.executeTakeFirst();
		const dp = await db
			.selectFrom('separator_states')
			.select(['ts', 'dp_bar'])
			.where('vessel_id', '=', vessel.id)
			.where('dp_bar', 'is not', null)
			.orderBy('ts', 'desc')
			.limit(1)
			.executeTakeFirst();
		const valve = await db
			.selectFrom('valve_events')
			.select(['closed_at'])
			.where('vessel_id', '=', vessel.id)
			.orderBy('opened_at', 'desc')
			.limit(1)
			.executeTakeFirst();
		if (state) {
			pipeline.latestSeparator.set(vessel.id, {
				ts: state.ts,
				dp_bar: dp?.dp_bar ?? null,
				dp_ts: dp?.ts ?? null,
				purge_valve: valve ? (valve.closed_at === null ? 'open' : 'closed') : null
			});
		}
	}
	const statuses = await db.selectFrom('gateway_status').selectAll().execute();
	for (const s of statuses) {
		pipeline.gateway.set(s.vessel_id, { online: !!s.online, at: s.changed_at, last_message_at: s.last_message_at });
	}
}
