/**
 * Columns of Aftwater's CSV exports. Headers name the quantity and its unit,
 * so a spreadsheet reader needs no key and the logger import recognises an
 * export as its own; values are SI as stored, times ISO 8601 in UTC.
 */
export const SAMPLE_COLUMNS = [
	{ key: 'ts', header: 'time (UTC)' },
	{ key: 'flow_lpm', header: 'flow (L/min)' },
	{ key: 'supply_bar', header: 'supply pressure (bar)' },
	{ key: 'temp_c', header: 'water temperature (°C)' },
	{ key: 'shaft_rpm', header: 'shaft speed (rpm)' }
] as const;

export const BUCKET_COLUMNS = [
	{ key: 'ts', header: 'bucket start (UTC)' },
	{ key: 'n', header: 'samples' },
	{ key: 'flow_min', header: 'flow min (L/min)' },
	{ key: 'flow_mean', header: 'flow mean (L/min)' },
	{ key: 'flow_max', header: 'flow max (L/min)' },
	{ key: 'supply_mean', header: 'supply pressure mean (bar)' },
	{ key: 'temp_mean', header: 'water temperature mean (°C)' },
	{ key: 'rpm_mean', header: 'shaft speed mean (rpm)' },
	{ key: 'covered_s', header: 'time with data (s)' },
	{ key: 'below_s', header: 'time below minimum (s)' }
] as const;

export const ALARM_COLUMNS = [
	{ key: 'id', header: 'alarm id' },
	{ key: 'source', header: 'source' },
	{ key: 'type', header: 'type' },
	{ key: 'priority', header: 'priority' },
	{ key: 'raised_at', header: 'raised (UTC)' },
	{ key: 'ended_at', header: 'returned to normal (UTC)' },
	{ key: 'duration_s', header: 'duration (s)' },
	{ key: 'state', header: 'state' },
	{ key: 'value', header: 'value that raised it' },
	{ key: 'limit_value', header: 'limit' },
	{ key: 'unit', header: 'unit of value and limit' },
	{ key: 'acknowledged_at', header: 'acknowledged (UTC)' },
	{ key: 'acknowledged_by', header: 'acknowledged by' }
] as const;

/** The SI unit an alarm type's value and limit are in. */
export const ALARM_VALUE_UNITS: Record<string, string> = {
	low_flow: 'L/min',
	low_flow_margin: 'L/min',
	low_supply_pressure: 'bar',
	separator_dp_high: 'bar',
	water_temp_high: '°C',
	stale_data: '',
	purge_missed: '',
	purge_valve_stuck_open: '',
	sensor_fault: ''
};
