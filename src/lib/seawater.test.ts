import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import {
	densityEos80,
	hydrostaticPressurePa,
	seaPressureAtCentreline,
	waterDensity
} from './seawater';

describe('EOS-80 one-atmosphere density', () => {
	// UNESCO Technical Papers in Marine Science 44 (1983), check values of the
	// 1980 equation of state at p = 0, given to 5 decimals in kg/m³.
	it.each([
		[0, 5, 999.96675],
		[35, 5, 1027.67547],
		[35, 25, 1023.34306]
	])('S = %s, t = %s °C → %s kg/m³', (s, t, rho) => {
		expect(densityEos80(s, t)).toBeCloseTo(rho, 5);
	});
});

describe('density for a shaft', () => {
	it('uses 1025 kg/m³ for sea water and 1000 for fresh by default', () => {
		// common practice (TRADE-FACTS.md)
		expect(waterDensity('sea')).toBe(1025);
		expect(waterDensity('fresh')).toBe(1000);
	});

	it('uses EOS-80 when salinity and temperature are known', () => {
		expect(waterDensity('sea', { salinityPsu: 35, tempC: 25 })).toBeCloseTo(1023.34306, 5);
		expect(waterDensity('fresh', { salinityPsu: 35, tempC: 5 })).toBeCloseTo(999.96675, 5);
	});

	it('falls back outside the equation’s range', () => {
		expect(waterDensity('sea', { salinityPsu: 35, tempC: 60 })).toBe(1025);
		expect(waterDensity('sea', { salinityPsu: null, tempC: 10 })).toBe(1025);
	});
});

describe('sea pressure at the shaft centreline, p = ρ g h', () => {
	it('worked example: 10 m of sea water is 1.00518 bar', () => {
		// derived (TRADE-FACTS.md): 1025 × 9.80665 × 10 = 100 518.16 Pa = 1.00518 bar
		expect(hydrostaticPressurePa(10, 1025)).toBeCloseTo(100_518.1625, 4);
		expect(seaPressureAtCentreline(10, 'sea')).toBeCloseTo(1.0051816, 7);
	});

	it('agrees with mathjs for fresh water', () => {
		// mathjs: 1000 kg/m³ × 9.80665 m/s² × 4.2 m in bar
		const ref = unit(1000, 'kg/m^3')
			.multiply(unit(9.80665, 'm/s^2'))
			.multiply(unit(4.2, 'm'))
			.toNumber('bar');
		expect(seaPressureAtCentreline(4.2, 'fresh')).toBeCloseTo(ref, 12);
	});

	it('is zero at or above the waterline', () => {
		expect(seaPressureAtCentreline(0, 'sea')).toBe(0);
		expect(seaPressureAtCentreline(-1, 'sea')).toBe(0);
	});
});
