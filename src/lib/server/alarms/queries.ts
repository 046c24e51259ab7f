/** Reading alarms: lists, one alarm with its history, a shaft's status. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../db/schema';
import type { AppContext } from '../context';
import { flowMargin } from '$lib/flow';
import { getShaft } from '../fleet/repository';
import { toAlarmView, type AlarmView } from './view';
import type { AlarmState } from '$lib/alarms/state-machine';

export interface AlarmQuery {
	vesselIds: number[] | 'all';
	/** active (not normal), all, or alarms now in one ISA-18.2 state */
	state: 'active' | 'all' | AlarmState;
	vesselId?: number;
	shaftId?: number;
	from?: number;
	to?: number;
	limit?: number;
}

/**
 * Active alarms (not normal), all of them, or those in one state, for the vessels given. Active ones
 * come unacknowledged first, then by priority, newest first — what needs an
 * answer stays on top.
 */
export async function listAlarms(db: Kysely<Database>, q: AlarmQuery): Promise<AlarmView[]> {
	if (q.vesselIds !== 'all' && q.vesselIds.length === 0) return [];
	const rows = await db
		.selectFrom('alarms')
		.selectAll()
		.$if(q.vesselIds !== 'all', (qb) => qb.where('vessel_id', 'in', q.vesselIds as number[]))
		.$if(q.vesselId !== undefined, (qb) => qb.where('vessel_id', '=', q.vesselId!))
		.$if(q.shaftId !== undefined, (qb) => qb.where('shaft_id', '=', q.shaftId!))
		.$if(q.state === 'active', (qb) => qb.where('ended_at', 'is', null))
		.$if(q.state !== 'active' && q.state !== 'all', (qb) => qb.where('state', '=', q.state as AlarmState))
		.$if(q.from !== undefined, (qb) => qb.where((eb) => eb.or([eb('ended_at', 'is', null), eb('ended_at', '>=', q.from!)])))
		.$if(q.to !== undefined, (qb) => qb.where('raised_at', '<', q.to!))
		.orderBy(sql`case when ended_at is null and acknowledged = 0 and state in ('unacknowledged', 'returned_unacknowledged') then 0 else 1 end`)
		.orderBy(sql`case priority when 'alarm' then 0 when 'warning' then 1 else 2 end`)
		.orderBy('raised_at', 'desc')
		.limit(Math.min(q.limit ?? 500, 5000))
		.execute();
	return rows.map(toAlarmView);
}

export async function alarmWithEvents(db: Kysely<Database>, id: number) {
	const row = await db.selectFrom('alarms').selectAll().where('id', '=', id).executeTakeFirst();
	if (!row) return undefined;
	const events = await db
		.selectFrom('alarm_events')
		.select(['id', 'at', 'event', 'from_state', 'to_state', 'actor', 'value', 'comment'])
		.where('alarm_id', '=', id)
		.orderBy('at')
		.orderBy('id')
		.execute();
	return { alarm: toAlarmView(row), events };
}

/** GET /api/shafts/{id}/status: the latest sample against the minimum, and the open alarms. */
export async function shaftStatus(ctx: AppContext, shaftId: number) {
	const shaft = await getShaft(ctx.db, shaftId);
	if (!shaft) return undefined;
	const latest = ctx.services.telemetry?.pipeline.latestSample.get(shaftId);
	const alarms = await listAlarms(ctx.db, { vesselIds: 'all', state: 'active', shaftId });
	return {
		shaft_id: shaftId,
		sample: latest
			? { ts: latest.ts, flow_lpm: latest.flow_lpm, supply_bar: latest.supply_bar, temp_c: latest.temp_c, shaft_rpm: latest.shaft_rpm }
			: null,
		min_flow_lpm: shaft.min_flow_lpm,
		margin: latest ? flowMargin(latest.flow_lpm, shaft.min_flow_lpm) : null,
		sea_pressure_bar: shaft.sea_pressure_bar,
		alarms: alarms.map((a) => ({
			id: a.id,
			type: a.type,
			priority: a.priority,
			state: a.state,
			raised_at: a.raised_at,
			value: a.value,
			limit_value: a.limit_value
		}))
	};
}
