import { describe, expect, it } from 'vitest';
import { ALARM_PRIORITY } from '$lib/alarms/types';
import { glanceOf, worstOf } from './fleet-state';

describe('glance state, worst first', () => {
	it('ranks no data with its own priority (warning), above a caution', () => {
		expect(ALARM_PRIORITY.stale_data).toBe('warning');
		expect(worstOf(['caution', 'stale', 'normal'])).toBe('stale');
		expect(worstOf(['stale', 'warning'])).toBe('warning');
		expect(worstOf(['stale', 'alarm'])).toBe('alarm');
		expect(
			glanceOf([
				{ type: 'sensor_fault', priority: 'caution', state: 'unacknowledged' },
				{ type: 'stale_data', priority: 'warning', state: 'acknowledged' }
			])
		).toBe('stale');
	});

	it('shows muted alarms but does not let them colour the shaft', () => {
		expect(glanceOf([{ type: 'low_flow', priority: 'alarm', state: 'shelved' }])).toBe('normal');
		expect(worstOf([])).toBe('normal');
	});
});
