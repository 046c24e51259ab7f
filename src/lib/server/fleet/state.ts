/**
 * The fleet as the overview and GET /api/vessels show it: vessels, shafts,
 * and each shaft's current state — latest reading against the minimum, open
 * alarms, gateway and separator — worst first.
 */
import { flowMargin } from '$lib/flow';
import { glanceOf, GLANCE_RANK, worstOf } from '$lib/fleet-state';
import type { AppContext } from '../context';
import { listAlarms } from '../alarms/queries';
import { listVessels } from './repository';

export async function fleetWithState(ctx: AppContext, ids: number[] | 'all') {
	const vessels = await listVessels(ctx.db, ids);
	const pipeline = ctx.services.telemetry?.pipeline;
	const alarms = await listAlarms(ctx.db, { vesselIds: vessels.map((v) => v.id), state: 'active' });
	const out = vessels.map((v) => {
		const vesselAlarms = alarms.filter((a) => a.vessel_id === v.id);
		const shafts = v.shafts.map((s) => {
			const latest = pipeline?.latestSample.get(s.id);
			const own = vesselAlarms.filter((a) => a.shaft_id === s.id);
			return {
				...s,
				latest: latest
					? { ts: latest.ts, flow_lpm: latest.flow_lpm, supply_bar: latest.supply_bar, temp_c: latest.temp_c, shaft_rpm: latest.shaft_rpm }
					: null,
				margin: latest ? flowMargin(latest.flow_lpm, s.min_flow_lpm) : null,
				state: glanceOf(own),
				alarms: own
			};
		});
		const separatorAlarms = vesselAlarms.filter((a) => a.shaft_id === null);
		const separator = pipeline?.latestSeparator.get(v.id) ?? null;
		const gateway = pipeline?.gateway.get(v.id) ?? null;
		const state = worstOf([...shafts.map((s) => s.state), glanceOf(separatorAlarms)]);
		return {
			...v,
			shafts,
			separator: separator && {
				...separator,
				// the ΔP alarm setpoint, so the reading is seen against it
				dp_max_bar: ctx.services.alarms?.settings.forVessel(v.id).separator_dp_max_bar ?? null,
				state: glanceOf(separatorAlarms),
				alarms: separatorAlarms
			},
			gateway,
			state,
			worst_alarm: vesselAlarms[0] ?? null
		};
	});
	return out.sort((a, b) => GLANCE_RANK[a.state] - GLANCE_RANK[b.state] || a.name.localeCompare(b.name));
}

export type FleetVessel = Awaited<ReturnType<typeof fleetWithState>>[number];
