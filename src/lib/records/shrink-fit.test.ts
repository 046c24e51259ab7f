import { describe, expect, it } from 'vitest';
import { MATERIALS, planShrinkFit, shrinkFitDeltaK } from './shrink-fit';

describe('shrink-fit heating', () => {
	it('matches the worked example of the shrink-fit relation', () => {
		// Engineering ToolBox shrink-fit page, ΔT = (δ + c) / (α · d); worked in TRADE-FACTS:
		// d = 300 mm, δ = 0.300 mm, α = 18.0e-6/K → 0.300 / (18e-6 × 300) = 55.6 K
		expect(
			shrinkFitDeltaK({
				bore_mm: 300,
				interference_mm: 0.3,
				assembly_clearance_mm: 0,
				alpha_per_k: 18e-6
			})
		).toBeCloseTo(55.56, 2);
		// with c = 0.15 mm: 0.450 / 0.0054 = 83.3 K
		expect(
			shrinkFitDeltaK({
				bore_mm: 300,
				interference_mm: 0.3,
				assembly_clearance_mm: 0.15,
				alpha_per_k: 18e-6
			})
		).toBeCloseTo(83.33, 2);
	});

	it('uses the expansion coefficients of Callister, Table B.6', () => {
		// Callister, Fundamentals of Materials Science and Engineering, Appendix B, Table B.6 (10⁻⁶/K)
		const alpha = Object.fromEntries(MATERIALS.map((m) => [m.id, m.alpha_per_k * 1e6]));
		expect(alpha).toEqual({
			bronze_c93200: expect.closeTo(18.0, 9),
			steel_1020: expect.closeTo(11.7, 9),
			steel_4140: expect.closeTo(12.3, 9),
			stainless_316: expect.closeTo(15.9, 9)
		});
	});

	it('plans the temperature to heat to from the workshop temperature', () => {
		const plan = planShrinkFit({
			bore_mm: 300,
			interference_mm: 0.3,
			assembly_clearance_mm: 0.15,
			alpha_per_k: 18e-6,
			ambient_c: 20
		});
		expect(plan.heat_to_c).toBeCloseTo(103.33, 2);
		expect(plan.bore_growth_mm).toBeCloseTo(0.45, 12);
		// common practice: about 0.001 in per inch of diameter; 0.3 / 300 = 0.001
		expect(plan.interference_ratio).toBeCloseTo(0.001, 12);
		expect(plan.notes).toEqual([]);
	});

	it('warns of a plan far hotter than usual, a large interference, or no clearance', () => {
		// 1.5 mm on 300 mm bronze: 1.5 / 0.0054 = 278 K + 20 °C = 298 °C; ratio 0.005 > 0.002
		const hot = planShrinkFit({
			bore_mm: 300,
			interference_mm: 1.5,
			assembly_clearance_mm: 0.5,
			alpha_per_k: 18e-6,
			ambient_c: 20
		});
		expect(hot.heat_to_c).toBeGreaterThan(350);
		expect(hot.notes.join(' ')).toMatch(/well above the usual/);
		expect(hot.notes.join(' ')).toMatch(/twice the old shop allowance/);
		expect(
			planShrinkFit({
				bore_mm: 300,
				interference_mm: 0.3,
				assembly_clearance_mm: 0,
				alpha_per_k: 18e-6,
				ambient_c: 20
			}).notes.join(' ')
		).toMatch(/no assembly clearance/);
	});
});
