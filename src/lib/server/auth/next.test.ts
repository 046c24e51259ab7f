import { describe, expect, it } from 'vitest';
import { safeNext } from './next';

const ORIGIN = 'https://aftwater.example';

describe('safeNext', () => {
	it('keeps a path on this site, with its query and fragment', () => {
		expect(safeNext('/vessels/2/history?range=7d#chart', ORIGIN)).toBe('/vessels/2/history?range=7d#chart');
		expect(safeNext('/settings', ORIGIN)).toBe('/settings');
	});

	it('sends anything that would leave the site to the fleet page', () => {
		// WHATWG URL (the parser browsers use) reads a backslash as a slash in http(s) URLs and
		// drops tabs and newlines, so each of these means //evil.test — another host
		for (const next of ['//evil.test', '/\\evil.test', '/\t/evil.test', '/\n/evil.test']) {
			expect(new URL(next, ORIGIN).host).toBe('evil.test'); // what a browser would do with it
			expect(safeNext(next, ORIGIN)).toBe('/');
		}
		expect(safeNext('https://evil.test/', ORIGIN)).toBe('/');
		expect(safeNext('evil.test', ORIGIN)).toBe('/');
		expect(safeNext(null, ORIGIN)).toBe('/');
		expect(safeNext('', ORIGIN)).toBe('/');
	});
});
