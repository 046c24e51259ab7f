/** Compliance of every visible shaft for one period: the fleet table. */
import type { AppContext } from '../context';
import { listVessels } from '../fleet/repository';
import { shaftCompliance, type ShaftCompliance } from './compliance';
import { historyOf } from './shaft-context';

export interface FleetComplianceRow {
	vessel: { id: number; code: string; name: string; time_zone: string };
	shaft: {
		id: number;
		code: string;
		name: string;
		position: string;
		diameter_mm: number;
		min_flow_lpm: number;
	};
	compliance: ShaftCompliance;
}

export async function fleetCompliance(
	ctx: AppContext,
	vesselIds: number[] | 'all',
	from: number,
	to: number,
	now = Date.now()
): Promise<FleetComplianceRow[]> {
	const rows: FleetComplianceRow[] = [];
	for (const vessel of await listVessels(ctx.db, vesselIds)) {
		for (const shaft of vessel.shafts) {
			const h = historyOf(ctx, shaft, vessel);
			rows.push({
				vessel: {
					id: vessel.id,
					code: vessel.code,
					name: vessel.name,
					time_zone: vessel.time_zone
				},
				shaft: {
					id: shaft.id,
					code: shaft.code,
					name: shaft.name,
					position: shaft.position,
					diameter_mm: shaft.diameter_mm,
					min_flow_lpm: h.minFlowLpm
				},
				compliance: await shaftCompliance(ctx.db, {
					shaftId: shaft.id,
					vesselId: vessel.id,
					from,
					to,
					now,
					gapMs: h.gapMs,
					minimums: h.minimums
				})
			});
		}
	}
	return rows;
}
