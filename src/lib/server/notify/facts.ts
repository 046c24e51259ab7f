/**
 * From stored rows to what an alarm e-mail states (AlarmFacts): vessel and
 * shaft names, the condition, the reading against its limit (SI; the template
 * converts), since when, and a note where a figure alone would not say it.
 */
import type { Kysely } from 'kysely';
import { minimumFlow } from '$lib/flow';
import { formatQuantity } from '$lib/units';
import type { UnitSystem } from '$lib/types';
import type { Database } from '../db/schema';
import type { IncidentRow } from '../db/tables/notify';
import type { AlarmFacts, MailVessel } from '../mail/templates/types';
import { CONDITION_OF, measuredFor } from './policy';
import { DEFAULT_ALARM_SETTINGS } from '$lib/alarms/settings';

export interface AlarmContext {
	incident: IncidentRow;
	alarm: {
		id: number;
		type: IncidentRow['type'];
		priority: IncidentRow['priority'];
		raised_at: number;
		value: number | null;
		limit_value: number | null;
		last_value: number | null;
	};
	vessel: MailVessel;
	shaft: { id: number; name: string; minFlowLpm: number } | null;
}

/** Loads what the e-mails of these incidents need, in one pass. */
export async function loadContexts(
	db: Kysely<Database>,
	incidents: IncidentRow[]
): Promise<AlarmContext[]> {
	if (!incidents.length) return [];
	const alarms = await db
		.selectFrom('alarms')
		.select(['id', 'type', 'priority', 'raised_at', 'value', 'limit_value', 'last_value'])
		.where(
			'id',
			'in',
			incidents.map((i) => i.current_alarm_id)
		)
		.execute();
	const vessels = await db
		.selectFrom('vessels')
		.select(['id', 'name', 'time_zone'])
		.where('id', 'in', [...new Set(incidents.map((i) => i.vessel_id))])
		.execute();
	const shaftIds = [...new Set(incidents.map((i) => i.shaft_id).filter((s) => s !== null))];
	const shafts = shaftIds.length
		? await db
				.selectFrom('shafts')
				.select(['id', 'name', 'diameter_mm', 'min_flow_factor_lpm_per_mm'])
				.where('id', 'in', shaftIds)
				.execute()
		: [];
	const out: AlarmContext[] = [];
	for (const incident of incidents) {
		const alarm = alarms.find((a) => a.id === incident.current_alarm_id);
		const v = vessels.find((x) => x.id === incident.vessel_id);
		if (!alarm || !v) continue;
		const s = shafts.find((x) => x.id === incident.shaft_id);
		out.push({
			incident,
			alarm,
			vessel: { id: v.id, name: v.name, timeZone: v.time_zone },
			shaft: s
				? {
						id: s.id,
						name: s.name,
						minFlowLpm: minimumFlow(s.diameter_mm, s.min_flow_factor_lpm_per_mm)
					}
				: null
		});
	}
	return out;
}

export type Moment = 'raised' | 'escalated' | 'followup';

/**
 * The facts for one recipient's units. The first message states the reading
 * that raised the alarm; escalations and follow-ups the latest one.
 */
export function factsOf(c: AlarmContext, units: UnitSystem, moment: Moment): AlarmFacts {
	const { alarm, incident } = c;
	const value = moment === 'raised' ? alarm.value : (alarm.last_value ?? alarm.value);
	const note = noteFor(c, units);
	return {
		alarmId: alarm.id,
		priority: alarm.priority,
		condition: CONDITION_OF[alarm.type],
		vessel: c.vessel,
		shaft: c.shaft ? { id: c.shaft.id, name: c.shaft.name } : null,
		measured: measuredFor(alarm.type, value, alarm.limit_value, c.shaft?.minFlowLpm ?? null),
		// an escalation counts from when the alarm began to wait for an answer (its template says
		// "unacknowledged for …" from this); the other messages from the incident's start
		since:
			moment === 'escalated' ? (incident.unacked_since ?? alarm.raised_at) : incident.opened_at,
		note
	};
}

function noteFor(c: AlarmContext, units: UnitSystem): string | null {
	const { alarm, incident } = c;
	const parts: string[] = [];
	if (alarm.type === 'low_flow_margin' && alarm.limit_value !== null) {
		parts.push(`Warning band below ${formatQuantity(units, 'flow', alarm.limit_value)}.`);
	}
	if (alarm.type === 'stale_data' && alarm.value !== null) {
		const limit = alarm.limit_value ?? DEFAULT_ALARM_SETTINGS.stale_after_s;
		parts.push(`No message for ${Math.round(alarm.value)} s (limit ${Math.round(limit)} s).`);
	}
	if (alarm.type === 'sensor_fault') {
		parts.push('A reading is implausible or frozen: check the flow locally.');
	}
	if (incident.instances > 1) {
		parts.push(`Raised ${incident.instances} times since it began (chattering).`);
	}
	return parts.length ? parts.join(' ') : null;
}
