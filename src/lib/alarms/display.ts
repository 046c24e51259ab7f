/** How an alarm is shown: its mark, and its value against its limit in the user's units. */
import type { MarkState } from '$lib/components/marks';
import { formatQuantity, type Quantity } from '$lib/units';
import type { UnitSystem } from '$lib/types';
import type { AlarmType, Priority } from './types';
import type { AlarmState } from './state-machine';

const QUANTITY: Partial<Record<AlarmType, Quantity>> = {
	low_flow: 'flow',
	low_flow_margin: 'flow',
	sensor_fault: 'flow',
	low_supply_pressure: 'pressure',
	separator_dp_high: 'pressure',
	water_temp_high: 'temperature'
};

export function alarmMark(a: { priority: Priority; state: AlarmState; type: AlarmType }): MarkState {
	if (a.state === 'shelved' || a.state === 'suppressed' || a.state === 'out_of_service') return 'muted';
	if (a.state === 'normal') return 'normal';
	if (a.type === 'stale_data') return 'stale';
	return a.priority;
}

export const needsAnswer = (state: AlarmState) => state === 'unacknowledged' || state === 'returned_unacknowledged';

/** "41.2 L/min (minimum 63.0 L/min)", "48 s without data (limit 30 s)" */
export function alarmReading(
	a: { type: AlarmType; value: number | null; limit_value: number | null },
	units: UnitSystem
): string {
	if (a.value === null) return '';
	if (a.type === 'stale_data') {
		return `${Math.round(a.value)} s without data${a.limit_value !== null ? ` (limit ${a.limit_value} s)` : ''}`;
	}
	const q = QUANTITY[a.type];
	if (!q) return String(a.value);
	const limitWord =
		a.type === 'low_flow' ? 'minimum' : a.type === 'low_flow_margin' ? 'warning below' : a.type === 'low_supply_pressure' ? 'needs' : 'limit';
	const limit = a.limit_value === null ? '' : ` (${limitWord} ${formatQuantity(units, q, a.limit_value)})`;
	return `${formatQuantity(units, q, a.value)}${limit}`;
}

/** the shade a priority gives a row, for colour and shape together */
export function priorityTone(p: Priority) {
	return p === 'alarm' ? 'border-alarm bg-alarm-bg' : p === 'warning' ? 'border-warning bg-warning-bg' : 'border-caution bg-caution-bg';
}
