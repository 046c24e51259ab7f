/** The limits the live charts draw for each shaft and separator, from the alarm settings. */
import type { AppContext } from '../context';
import type { Shaft } from '../fleet/repository';

export function shaftLimits(ctx: AppContext, shaft: Shaft) {
	const s = ctx.services.alarms?.settings.forShaft(shaft.id);
	return {
		min_flow_lpm: shaft.min_flow_lpm,
		warning_below_lpm: shaft.min_flow_lpm * (1 + (s?.margin_warning ?? 0.2)),
		sea_pressure_bar: shaft.sea_pressure_bar,
		supply_alarm_below_bar: shaft.sea_pressure_bar + (s?.supply_margin_bar ?? 0.3),
		water_temp_max_c: s?.water_temp_max_c ?? 45
	};
}
export type ShaftLimitsView = ReturnType<typeof shaftLimits>;

export function separatorLimits(ctx: AppContext, vesselId: number) {
	return { dp_max_bar: ctx.services.alarms?.settings.forVessel(vesselId).separator_dp_max_bar ?? 0.8 };
}
