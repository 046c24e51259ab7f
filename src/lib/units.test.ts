import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import {
	barToKpa,
	barToPsi,
	cToF,
	fToC,
	formatMargin,
	formatQuantity,
	gpmToLpm,
	inToMm,
	lpmToGpm,
	mmToIn,
	PA_PER_PSI,
	psiToBar,
	toDisplay,
	fromDisplay
} from './units';

describe('unit definitions', () => {
	it('inch is 25.4 mm exactly', () => {
		// NIST SP 811, Appendix B: 1 in = 0.0254 m exactly
		expect(inToMm(1)).toBe(25.4);
		expect(mmToIn(254)).toBeCloseTo(10, 12);
	});

	it('US gallon is 3.785411784 L exactly', () => {
		// NIST SP 811, Appendix B: 1 gal (US) = 231 in³ = 3.785411784 L
		expect(gpmToLpm(1)).toBe(3.785411784);
		// derived: 231 in³ × (2.54 cm)³ = 3785.411784 cm³
		expect((231 * 2.54 ** 3) / 1000).toBeCloseTo(gpmToLpm(1), 12);
	});

	it('psi from the pound-force and the inch', () => {
		// derived from NIST SP 811: lbf = 0.45359237 kg × 9.80665 m/s², in = 0.0254 m
		expect(PA_PER_PSI).toBeCloseTo(6894.757293168, 6);
		expect(barToPsi(1)).toBeCloseTo(100_000 / 6894.757293168, 9);
	});

	it('bar is 100 kPa exactly', () => {
		// EU Directive 80/181/EEC, Annex, chapter I: 1 bar = 100 000 Pa
		expect(barToKpa(3)).toBe(300);
	});

	it('°F = °C × 9/5 + 32', () => {
		// SI Brochure: t/°F = 9/5 × t/°C + 32
		expect(cToF(100)).toBe(212);
		expect(cToF(-40)).toBe(-40);
		expect(fToC(32)).toBe(0);
	});
});

describe('conversions agree with the mathjs reference library', () => {
	// mathjs units are exact to ~1e-9 relative; its psi is 4e-7 Pa below exact,
	// so psi is compared with a relative tolerance of 1e-9 (TRADE-FACTS.md).
	const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

	it.each([1, 22.5, 90, 1234.5])('%s L/min to US gal/min', (lpm) => {
		expect(rel(lpmToGpm(lpm), unit(lpm, 'L/minute').toNumber('gallon/minute'))).toBeLessThan(1e-9);
	});

	it.each([150, 300, 600])('%s mm to inch', (mm) => {
		expect(rel(mmToIn(mm), unit(mm, 'mm').toNumber('inch'))).toBeLessThan(1e-12);
	});

	it.each([0.3, 1.00518, 3, 10])('%s bar to psi and back', (bar) => {
		expect(rel(barToPsi(bar), unit(bar, 'bar').toNumber('psi'))).toBeLessThan(1e-9);
		expect(psiToBar(barToPsi(bar))).toBeCloseTo(bar, 12);
	});

	it.each([-2, 0, 25, 45])('%s °C to °F', (c) => {
		expect(cToF(c)).toBeCloseTo(unit(c, 'degC').toNumber('degF'), 9);
	});
});

describe('display', () => {
	it('converts SI to the chosen system and back', () => {
		expect(toDisplay('metric', 'flow', 45)).toBe(45);
		expect(toDisplay('us', 'flow', 3.785411784)).toBeCloseTo(1, 12);
		expect(fromDisplay('us', 'pressure', toDisplay('us', 'pressure', 2.5))).toBeCloseTo(2.5, 12);
	});

	it('formats with the unit and a dash for no value', () => {
		expect(formatQuantity('metric', 'flow', 45.04)).toBe('45.0 L/min');
		expect(formatQuantity('us', 'flow', 37.85411784)).toBe('10.0 gpm');
		expect(formatQuantity('us', 'temperature', 100)).toBe('212 °F');
		expect(formatQuantity('metric', 'flow', null)).toBe('—');
		expect(formatQuantity('metric', 'flow', Number.NaN)).toBe('—');
	});

	it('formats margins as signed percentages', () => {
		expect(formatMargin(0.234)).toBe('+23 %');
		expect(formatMargin(-0.5)).toBe('−50 %');
		expect(formatMargin(0)).toBe('0 %');
		expect(formatMargin(null)).toBe('—');
	});
});
