/**
 * What history needs to know about a shaft: its vessel, its minimum flow, the
 * stale threshold beyond which a gap is unknown time (the same one the ingest
 * writer builds rollups with), and its low-margin warning band.
 */
import { DEFAULT_ALARM_SETTINGS } from '$lib/alarms/settings';
import { constantMinimum, type MinimumSpan } from '$lib/minimums';
import type { AppContext } from '../context';
import { getShaft, getVesselRow, toVessel, type Shaft, type Vessel } from '../fleet/repository';
import { DEFAULT_STALE_AFTER_S } from '../ingest/registry';

export interface ShaftHistory {
	shaft: Shaft;
	vessel: Vessel;
	minFlowLpm: number;
	/** the minimums in force over time, oldest first (see $lib/minimums) */
	minimums: MinimumSpan[];
	/** a gap between samples longer than this is unknown time, ms */
	gapMs: number;
	/** the low-margin warning band above the minimum, as a fraction of it */
	marginWarning: number;
	/** the telemetry topic of the shaft, for imports through the ingest pipeline */
	topic: string;
}

export async function shaftHistory(
	ctx: AppContext,
	shaftId: number
): Promise<ShaftHistory | undefined> {
	const shaft = await getShaft(ctx.db, shaftId);
	if (!shaft) return undefined;
	const vesselRow = await getVesselRow(ctx.db, shaft.vessel_id);
	if (!vesselRow) return undefined;
	return historyOf(ctx, shaft, toVessel(vesselRow));
}

export function historyOf(ctx: AppContext, shaft: Shaft, vessel: Vessel): ShaftHistory {
	const entry = ctx.services.telemetry?.registry.shaft(shaft.id);
	const settings = ctx.services.alarms?.settings.forShaft(shaft.id) ?? DEFAULT_ALARM_SETTINGS;
	return {
		shaft,
		vessel,
		minFlowLpm: entry?.minFlowLpm ?? shaft.min_flow_lpm,
		minimums: entry?.minimums ?? constantMinimum(shaft.min_flow_lpm),
		gapMs: entry?.gapMs ?? DEFAULT_STALE_AFTER_S * 1000,
		marginWarning: settings.margin_warning,
		topic: `${ctx.config.MQTT_TOPIC_PREFIX}/${vessel.code}/${shaft.code}/telemetry`
	};
}
