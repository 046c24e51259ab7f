import { describe, expect, it } from 'vitest';
import { changedSettings, fromFormValue, toFormValue } from './settings-form';
import { DEFAULT_ALARM_SETTINGS } from './settings';

describe('alarm settings form', () => {
	it('shows fractions as percentages and pressures in psi for US units', () => {
		expect(toFormValue('margin_warning', 0.2, 'metric')).toBe('20');
		// 0.3 bar = 30 000 Pa / 6894.757293168 Pa/psi = 4.3511 psi (NIST SP 811 derived psi)
		expect(toFormValue('supply_margin_bar', 0.3, 'us')).toBe('4.3511');
		expect(fromFormValue('supply_margin_bar', '5', 'us')).toBeCloseTo((5 * 6894.757293168) / 100_000, 12);
		expect(fromFormValue('water_temp_max_c', '113', 'us')).toBeCloseTo(45, 12); // (113 − 32) × 5/9
	});

	it('sends only what changed, so rounded values are not written back', () => {
		const form = new FormData();
		form.set('supply_margin_bar', toFormValue('supply_margin_bar', 0.3, 'us'));
		form.set('margin_warning', '25');
		form.set('low_flow_delay_s', 'soon');
		const { update, errors } = changedSettings(form, DEFAULT_ALARM_SETTINGS, 'us');
		expect(update).toEqual({ margin_warning: 0.25 });
		expect(errors).toEqual({ low_flow_delay_s: 'a number' });
	});
});
