import { describe, expect, it } from 'vitest';
import {
	ALARM_EXPLANATIONS,
	ALARM_PRIORITY,
	ALARM_SCOPE,
	ALARM_TYPE_LABELS,
	ALARM_TYPES,
	OUT_OF_SERVICE_IN_DRY_DOCK,
	PRIORITIES,
	priorityRank,
	SEPARATOR_ALARM_TYPES,
	SHAFT_ALARM_TYPES,
	SUPPRESSIBLE_WHEN_STOPPED
} from './types';

describe('priorities (IMO Code on Alerts and Indicators, 2009 [memory])', () => {
	it('has the three marine categories, most urgent first', () => {
		expect(PRIORITIES).toEqual(['alarm', 'warning', 'caution']);
		expect(priorityRank('alarm')).toBeLessThan(priorityRank('warning'));
		expect(priorityRank('warning')).toBeLessThan(priorityRank('caution'));
	});

	it.each([
		['low_flow', 'alarm'],
		['low_flow_margin', 'warning'],
		['low_supply_pressure', 'alarm'],
		['separator_dp_high', 'warning'],
		['purge_missed', 'warning'],
		['purge_valve_stuck_open', 'warning'],
		['stale_data', 'warning'],
		['water_temp_high', 'warning'],
		['sensor_fault', 'caution']
	] as const)('%s is %s', (type, priority) => {
		expect(ALARM_PRIORITY[type]).toBe(priority);
	});
});

describe('what each alarm applies to', () => {
	it('separator alarms are the vessel’s; the rest are per shaft', () => {
		expect(SEPARATOR_ALARM_TYPES).toEqual([
			'separator_dp_high',
			'purge_missed',
			'purge_valve_stuck_open'
		]);
		expect(SHAFT_ALARM_TYPES).toEqual([
			'low_flow',
			'low_flow_margin',
			'low_supply_pressure',
			'stale_data',
			'water_temp_high',
			'sensor_fault'
		]);
		expect(ALARM_SCOPE.low_flow).toBe('shaft');
	});

	it('only the flow alarms are suppressed by design while stopped', () => {
		expect([...SUPPRESSIBLE_WHEN_STOPPED].sort()).toEqual(
			['low_flow', 'low_flow_margin', 'low_supply_pressure'].sort()
		);
	});

	it('every alarm goes out of service in dry-dock', () => {
		expect([...OUT_OF_SERVICE_IN_DRY_DOCK].sort()).toEqual([...ALARM_TYPES].sort());
	});

	it.each(ALARM_TYPES)('%s has a label and a one-line explanation', (type) => {
		expect(ALARM_TYPE_LABELS[type]).toMatch(/^[A-Z]/);
		expect(ALARM_EXPLANATIONS[type]).toMatch(/^[A-Z].*[.]$/);
		expect(ALARM_EXPLANATIONS[type]).not.toMatch(/\n/);
	});
});
