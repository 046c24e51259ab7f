/**
 * The vocabulary of alarms: which alarms exist, how urgent each is, what each
 * applies to, and which of them the operating situation may take away.
 *
 * Priorities are the marine alert categories of the IMO Code on Alerts and
 * Indicators (2009, Res. A.1021(26)) [memory]; the state model is ANSI/ISA-18.2
 * (IEC 62682), see state-machine.ts. The settings schema lives in settings.ts
 * and is re-exported here so that the whole vocabulary has one import.
 */

export const ALARM_TYPES = [
	'low_flow',
	'low_flow_margin',
	'low_supply_pressure',
	'separator_dp_high',
	'purge_missed',
	'purge_valve_stuck_open',
	'stale_data',
	'water_temp_high',
	'sensor_fault'
] as const;
export type AlarmType = (typeof ALARM_TYPES)[number];

/** Most urgent first, so the index is the sort order for "worst first". */
export const PRIORITIES = ['alarm', 'warning', 'caution'] as const;
export type Priority = (typeof PRIORITIES)[number];

export const PRIORITY_LABELS: Record<Priority, string> = {
	alarm: 'Alarm',
	warning: 'Warning',
	caution: 'Caution'
};

/** The meaning of each category, IMO Code on Alerts and Indicators (2009) [memory]. */
export const PRIORITY_MEANINGS: Record<Priority, string> = {
	alarm: 'Needs immediate attention and action.',
	warning: 'Not immediately hazardous, but may become so.',
	caution: 'For awareness: an unusual condition that needs consideration.'
};

/** 0 for the most urgent; compare ranks to sort worst first. */
export function priorityRank(priority: Priority): number {
	return PRIORITIES.indexOf(priority);
}

/**
 * Low flow and low supply pressure destroy a bearing within hours, so they are
 * alarms; everything that erodes it slowly or may lead to low flow is a warning;
 * a doubtful sensor is a caution, because the flow alarms are what protect the bearing.
 */
export const ALARM_PRIORITY: Record<AlarmType, Priority> = {
	low_flow: 'alarm',
	low_flow_margin: 'warning',
	low_supply_pressure: 'alarm',
	separator_dp_high: 'warning',
	purge_missed: 'warning',
	purge_valve_stuck_open: 'warning',
	stale_data: 'warning',
	water_temp_high: 'warning',
	sensor_fault: 'caution'
};

export const ALARM_TYPE_LABELS: Record<AlarmType, string> = {
	low_flow: 'Low flow',
	low_flow_margin: 'Low flow margin',
	low_supply_pressure: 'Low supply pressure',
	separator_dp_high: 'Separator ΔP high',
	purge_missed: 'Purge missed',
	purge_valve_stuck_open: 'Purge valve stuck open',
	stale_data: 'No recent data',
	water_temp_high: 'Water temperature high',
	sensor_fault: 'Sensor fault'
};

/** One line for the UI: what it means for the bearing, not how it is computed. */
export const ALARM_EXPLANATIONS: Record<AlarmType, string> = {
	low_flow:
		'Clean-water flow to the bearing is below its minimum: the bearing can run dry and overheat within hours.',
	low_flow_margin:
		'Flow is above the minimum but inside the warning band: it becomes low flow if it falls further.',
	low_supply_pressure:
		'Supply pressure is not far enough above the sea pressure at the shaft centreline: sea water and sand can enter the stern tube.',
	separator_dp_high:
		'Pressure drop across the separator is above its setpoint: it may be clogging, and flow will fall.',
	purge_missed:
		'A scheduled purge produced no valve-open report: sediment is building up in the separator.',
	purge_valve_stuck_open:
		'The purge valve stayed open past the purge time: clean water is dumped overboard and flow to the bearings can fall.',
	stale_data:
		'No message from the gateway for this shaft within the set time: the shaft is not being watched.',
	water_temp_high: 'Water temperature is above the set limit; the bearing maker’s limit governs.',
	sensor_fault:
		'A reading is physically implausible, or the flow reading has not changed while the shaft turns: check the sensor and the flow locally; do not dismiss a low-flow alarm on this account.'
};

/**
 * What an alarm is about: one shaft, or the vessel's one separator, which feeds
 * every shaft (its clogging or a missed purge concerns them all at once).
 */
export const ALARM_SCOPES = ['shaft', 'separator'] as const;
export type AlarmScope = (typeof ALARM_SCOPES)[number];

export const ALARM_SCOPE: Record<AlarmType, AlarmScope> = {
	low_flow: 'shaft',
	low_flow_margin: 'shaft',
	low_supply_pressure: 'shaft',
	separator_dp_high: 'separator',
	purge_missed: 'separator',
	purge_valve_stuck_open: 'separator',
	stale_data: 'shaft',
	water_temp_high: 'shaft',
	sensor_fault: 'shaft'
};

export const SHAFT_ALARM_TYPES: readonly AlarmType[] = ALARM_TYPES.filter(
	(t) => ALARM_SCOPE[t] === 'shaft'
);
export const SEPARATOR_ALARM_TYPES: readonly AlarmType[] = ALARM_TYPES.filter(
	(t) => ALARM_SCOPE[t] === 'separator'
);

/**
 * Suppressed by design (ISA-18.2) while the gateway reports the shaft below
 * running_rpm_min: a stopped shaft needs no water, and the pump is often off in port.
 */
export const SUPPRESSIBLE_WHEN_STOPPED: readonly AlarmType[] = [
	'low_flow',
	'low_flow_margin',
	'low_supply_pressure'
];

/**
 * Every alarm goes out of service when the vessel's mode is dry-dock. Out of the
 * water there is no sea pressure, the sea suction is closed, the stern-tube water
 * system and the separator are drained and often opened up, sensors go ashore for
 * calibration and the yard cuts the gateway's power; each of the nine would then
 * report the dry-dock itself, for weeks, which is the nuisance alarming that teaches
 * a crew to ignore alarms (ISA-18.2). Nothing is lost by it: turning the shaft on
 * the turning gear (about 1 rpm) is below running_rpm_min, so low flow would be
 * suppressed by design anyway, and stale data and sensor faults come back into
 * service with the mode change, which is when a dead gateway or sensor must show.
 * The state machine keeps tracking the conditions meanwhile, so an alarm still
 * active when the vessel leaves dry-dock is annunciated at once.
 */
export const OUT_OF_SERVICE_IN_DRY_DOCK: readonly AlarmType[] = [
	'low_flow',
	'low_flow_margin',
	'low_supply_pressure',
	'stale_data',
	'sensor_fault',
	'water_temp_high',
	'separator_dp_high',
	'purge_missed',
	'purge_valve_stuck_open'
];

export {
	alarmSettings,
	alarmSettingsUpdate,
	ALARM_SETTING_FIELDS,
	DEFAULT_ALARM_SETTINGS,
	applyAlarmSettingsUpdate,
	debounceDelays
} from './settings';
export type { AlarmSettings, AlarmSettingsUpdate, AlarmSettingField } from './settings';
