import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import {
	bearingFromForm,
	parseReadings,
	sealTestFromForm,
	shrinkFitFromForm,
	toFormErrors
} from './forms';

describe('records forms', () => {
	it('reads a pasted table of seconds and pressures, in seconds or m:ss, skipping a header', () => {
		const r = parseReadings(
			'time s, pressure bar\n0, 3.00\n1:30 2.99\n\n180;2.98\nnonsense line here',
			'metric'
		);
		expect(r.readings).toEqual([
			{ t_s: 0, pressure_bar: 3 },
			{ t_s: 90, pressure_bar: 2.99 },
			{ t_s: 180, pressure_bar: 2.98 }
		]);
		expect(r.bad_lines).toEqual([6]);
	});

	it('turns pressures typed in psi into bar', () => {
		// reference: mathjs unit('43.5 psi') in bar
		const r = parseReadings('0, 43.5', 'us');
		expect(r.readings[0].pressure_bar).toBeCloseTo(unit(43.5, 'psi').toNumber('bar'), 6);
		const body = sealTestFromForm(
			{
				test_pressure: '43.5',
				hold_min: '3',
				resolution: '0.1',
				readings: '0 43.5\n180 43.5',
				tested_at: '2026-11-30'
			},
			'us'
		).body;
		expect(body.hold_s).toBe(180);
		expect(body.test_pressure_bar).toBeCloseTo(unit(43.5, 'psi').toNumber('bar'), 6);
	});

	it('turns inches into millimetres and keeps what it cannot read for the schema to refuse', () => {
		// NIST SP 811: 1 in = 25.4 mm exactly
		const b = bearingFromForm(
			{ bore: '16.55', journal: '16.5', max_clearance: '', measured_at: '2026-11-30' },
			'us'
		);
		expect(b.bore_mm).toBeCloseTo(16.55 * 25.4, 9);
		expect(b.max_clearance_mm).toBeNull();
		expect(bearingFromForm({ bore: 'wide', journal: '400' }, 'metric').bore_mm).toBe('wide');
	});

	it('reads α in 10⁻⁶ per kelvin and a temperature in °F', () => {
		const s = shrinkFitFromForm(
			{
				bore: '300',
				interference: '0.3',
				assembly_clearance: '0.15',
				material: 'other',
				alpha_e6: '18',
				ambient: '68'
			},
			'metric'
		);
		expect(s.alpha_per_k).toBeCloseTo(18e-6, 15);
		// SI Brochure: °C = (°F − 32) × 5/9; 68 °F = 20 °C
		expect(
			shrinkFitFromForm({ ambient: '68', material: 'bronze_c93200' }, 'us').ambient_c
		).toBeCloseTo(20, 12);
	});

	it('maps the API’s field names back to the form’s', () => {
		expect(
			toFormErrors({ reading_mm: 'a number', 'readings.2.t_s': 'bad', _: 'whole form' })
		).toEqual({ reading: 'a number', readings: 'bad', _: 'whole form' });
	});
});
