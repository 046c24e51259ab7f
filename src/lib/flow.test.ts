import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import {
	DEFAULT_MIN_FLOW_FACTOR_LPM_PER_MM,
	flowMargin,
	minimumFlow,
	minimumFlowUsRule,
	minimumFlowUsRuleLpm
} from './flow';

describe('minimum flow (common practice: 0.15 L/min per mm; 1 US gal/min per inch)', () => {
	it('uses 0.15 L/min per mm by default', () => {
		// common practice, no published source (TRADE-FACTS.md); 300 mm × 0.15 = 45 L/min
		expect(DEFAULT_MIN_FLOW_FACTOR_LPM_PER_MM).toBe(0.15);
		expect(minimumFlow(300)).toBeCloseTo(45, 12);
		expect(minimumFlow(150)).toBeCloseTo(22.5, 12);
		expect(minimumFlow(600)).toBeCloseTo(90, 12);
	});

	it('takes the bearing maker’s factor when given', () => {
		expect(minimumFlow(400, 0.2)).toBeCloseTo(80, 12);
	});

	it('states the US customary form: 1 gpm per inch', () => {
		// common practice; 10 in shaft → 10 US gal/min
		expect(minimumFlowUsRule(254)).toBeCloseTo(10, 12);
		// derived with mathjs: 1 gal/min per inch = 0.14903196 L/min per mm (TRADE-FACTS.md)
		const perMm = unit(1, 'gallon/minute').toNumber('L/minute') / unit(1, 'inch').toNumber('mm');
		expect(perMm).toBeCloseTo(0.14903196, 8);
		expect(minimumFlowUsRuleLpm(1)).toBeCloseTo(perMm, 12);
	});

	it('the two forms agree within 1 %', () => {
		// derived: 0.15 / 0.14903196 = 1.0065 → 0.65 %
		for (const d of [150, 300, 450, 600]) {
			const metric = minimumFlow(d);
			const us = minimumFlowUsRuleLpm(d);
			expect(Math.abs(metric - us) / us).toBeLessThan(0.01);
			expect(Math.abs(metric - us) / us).toBeCloseTo(0.0065, 3);
		}
	});
});

describe('flow margin (Q − Q_min) / Q_min', () => {
	it('is zero at the minimum, positive above, negative below', () => {
		expect(flowMargin(45, 45)).toBe(0);
		expect(flowMargin(54, 45)).toBeCloseTo(0.2, 12);
		expect(flowMargin(22.5, 45)).toBeCloseTo(-0.5, 12);
	});

	it('is undefined without a positive minimum or a finite flow', () => {
		expect(flowMargin(10, 0)).toBeNull();
		expect(flowMargin(Number.NaN, 45)).toBeNull();
	});
});
