import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import {
	LPM_PER_MM_PER_GPM_PER_IN,
	inputText,
	inputToSi,
	parseDecimal,
	siToInput,
	unchanged
} from './quantities';

describe('typed figures to SI', () => {
	it('inches typed by a US user are stored as millimetres without float noise', () => {
		// NIST SP 811, Appendix B: 1 in = 25.4 mm exactly, so 12 in = 304.8 mm
		expect(12 * 25.4).not.toBe(304.8); // what binary floating point gives
		expect(inputToSi('us', 'length', 12)).toBe(304.8);
		expect(inputToSi('us', 'length', 16.5)).toBe(419.1);
		expect(inputToSi('metric', 'length', 420)).toBe(420);
	});

	it('feet of depth are stored as metres', () => {
		// NIST SP 811, Appendix B: 1 ft = 0.3048 m exactly
		expect(inputToSi('us', 'depth', 10)).toBe(3.048);
		expect(inputToSi('us', 'depth', 1)).toBeCloseTo(unit(1, 'ft').toNumber('m'), 12);
	});

	it('1 US gal/min per inch is 0.14903196 L/min per mm', () => {
		// TRADE-FACTS.md [derived]: 3.785411784 L / 25.4 mm
		expect(LPM_PER_MM_PER_GPM_PER_IN).toBeCloseTo(0.14903196, 8);
		expect(LPM_PER_MM_PER_GPM_PER_IN).toBeCloseTo(
			unit(1, 'gallon/minute').toNumber('L/minute') / 25.4,
			12
		);
		expect(inputToSi('us', 'factor', 1)).toBe(0.149032);
		// the 0.15 L/min per mm default shows as 1.0065 gpm per inch, which reads back as
		// 0.150001: the form keeps the default exactly because it was left as shown
		expect(inputText('us', 'factor', 0.15)).toBe('1.0065');
		expect(inputToSi('us', 'factor', 1.0065)).toBeCloseTo(0.15, 5);
		expect(unchanged('us', 'factor', 1.0065, 0.15)).toBe(true);
	});
});

describe('what an input shows', () => {
	it('rounds to the input’s resolution and drops trailing zeros', () => {
		expect(inputText('metric', 'length', 420)).toBe('420');
		expect(inputText('us', 'length', 420)).toBe('16.535'); // 420 / 25.4 = 16.53543…
		expect(inputText('metric', 'depth', 4.2)).toBe('4.2');
		expect(inputText('us', 'depth', 4.2)).toBe('13.78'); // 4.2 / 0.3048 = 13.7795…
		expect(inputText('metric', 'factor', 0.15)).toBe('0.15');
		expect(inputText('metric', 'length', null)).toBe('');
		expect(siToInput('metric', 'factor', 0.15)).toBe(0.15);
	});

	it('a value left as shown counts as unchanged, so an edit keeps the stored SI exactly', () => {
		expect(unchanged('us', 'length', 16.535, 420)).toBe(true);
		// read back it would be 419.989 mm: not what is stored
		expect(inputToSi('us', 'length', 16.535)).not.toBe(420);
		expect(unchanged('us', 'length', 16.54, 420)).toBe(false);
		expect(unchanged('metric', 'length', 420, 420)).toBe(true);
	});
});

describe('parseDecimal', () => {
	it('reads plain decimals, a decimal comma, and nothing else', () => {
		expect(parseDecimal('420')).toBe(420);
		expect(parseDecimal(' 16.5 ')).toBe(16.5);
		expect(parseDecimal('16,5')).toBe(16.5);
		expect(parseDecimal('.5')).toBe(0.5);
		expect(parseDecimal('')).toBeNull();
		expect(parseDecimal(null)).toBeNull();
		expect(parseDecimal('1,000.5')).toBeNaN();
		expect(parseDecimal('12 in')).toBeNaN();
		expect(parseDecimal('1e3')).toBeNaN();
		expect(parseDecimal('Infinity')).toBeNaN();
	});
});
