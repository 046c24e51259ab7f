/** What GET/PUT …/alarm-settings answer: the settings and what they mean for the shaft. */
import { ALARM_SETTING_FIELDS, alarmSettingsUpdate, type AlarmSettings } from '$lib/alarms/settings';
import type { RequestEvent } from '@sveltejs/kit';
import type { AppContext } from '../context';
import { ApiError, invalid } from '../api/errors';
import { actorOf } from '../audit';
import { requirePermission } from '../api/handler';
import { getShaft } from '../fleet/repository';

function service(ctx: AppContext) {
	if (!ctx.services.alarms) throw new ApiError(503, 'unavailable', 'the alarm engine is not running');
	return ctx.services.alarms;
}

export async function shaftSettingsResponse(ctx: AppContext, shaftId: number, settings?: AlarmSettings) {
	const shaft = await getShaft(ctx.db, shaftId);
	if (!shaft) throw new ApiError(404, 'not_found', 'shaft not found');
	const s = settings ?? service(ctx).settings.forShaft(shaftId);
	return {
		shaft_id: shaftId,
		settings: s,
		derived: {
			min_flow_lpm: shaft.min_flow_lpm,
			margin_warning_below_lpm: shaft.min_flow_lpm * (1 + s.margin_warning),
			sea_pressure_bar: shaft.sea_pressure_bar,
			supply_alarm_below_bar: shaft.sea_pressure_bar + s.supply_margin_bar
		},
		fields: ALARM_SETTING_FIELDS,
		caution:
			'The bearing maker’s minimum flow and the class society’s rules govern these limits. Aftwater supplements, and never replaces, the vessel’s approved alarm and monitoring system.'
	};
}

/** Parses a settings update body; unknown fields are refused so a misspelt name is an error. */
export async function readSettingsUpdate(event: RequestEvent) {
	const user = requirePermission(event, 'alarm.settings');
	let body: unknown;
	try {
		body = await event.request.json();
	} catch {
		throw new ApiError(400, 'bad_json', 'the body is not valid JSON');
	}
	const parsed = alarmSettingsUpdate.safeParse(body);
	if (!parsed.success) throw invalid(parsed.error);
	return { actor: actorOf(user), update: parsed.data };
}

export { service as alarmService };
