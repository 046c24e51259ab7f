/**
 * Colour contrast of the design tokens in both themes, against WCAG 2.1 AA
 * (success criterion 1.4.3: 4.5:1 for text; 1.4.11: 3:1 for graphics such as
 * state marks and chart lines). Luminance and contrast ratio as WCAG 2.1
 * defines them ("relative luminance", "contrast ratio" in the glossary).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';

const css = readFileSync(resolve(import.meta.dirname, '../app.css'), 'utf8');

function tokens(selector: string): Record<string, string> {
	const start = css.indexOf(`${selector} {`);
	const block = css.slice(start, css.indexOf('}', start));
	return Object.fromEntries([...block.matchAll(/--aw-([a-z0-9-]+):\s*(#[0-9a-f]{6})/gi)].map((m) => [m[1], m[2]]));
}

const channel = (c: number) => {
	const s = c / 255;
	return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
};
const luminance = (hex: string) => {
	const [r, g, b] = [1, 3, 5].map((i) => channel(parseInt(hex.slice(i, i + 2), 16)));
	return 0.2126 * r + 0.7152 * g + 0.0722 * b;
};
const contrast = (a: string, b: string) => {
	const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
	return (hi + 0.05) / (lo + 0.05);
};

describe('WCAG contrast formula', () => {
	it('gives the published extremes', () => {
		// WCAG 2.1: black on white is 21:1, a colour on itself 1:1
		expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 6);
		expect(contrast('#777777', '#777777')).toBe(1);
	});
});

describe.each([
	['light', tokens(':root')],
	['dark', tokens("[data-theme='dark']")]
])('%s theme', (_name, t) => {
	it('has every token the check needs', () => {
		for (const k of ['bg', 'surface', 'surface-2', 'ink', 'ink-2', 'ink-3', 'alarm', 'warning', 'caution', 'stale', 'ok', 'accent']) {
			expect(t[k], k).toMatch(/^#/);
		}
	});

	it.each(['ink', 'ink-2', 'ink-3', 'accent', 'alarm', 'warning', 'caution', 'stale', 'ok'])('text in %s reads at 4.5:1 on the backgrounds', (fg) => {
		for (const bg of ['bg', 'surface']) expect(contrast(t[fg], t[bg]), `${fg} on ${bg}`).toBeGreaterThanOrEqual(4.5);
	});

	it.each(['alarm', 'warning', 'caution', 'stale', 'ok'])('%s text reads at 4.5:1 on its own tinted background', (state) => {
		expect(contrast(t[state], t[`${state}-bg`])).toBeGreaterThanOrEqual(4.5);
		expect(contrast(t.ink, t[`${state}-bg`])).toBeGreaterThanOrEqual(4.5);
	});

	it('the accent button text reads on the accent', () => {
		expect(contrast(t['accent-ink'], t.accent)).toBeGreaterThanOrEqual(4.5);
	});

	it.each(['chart-flow', 'chart-2', 'chart-3'])('chart line %s stands out at 3:1 on the surface', (line) => {
		expect(contrast(t[line], t.surface)).toBeGreaterThanOrEqual(3);
	});
});
