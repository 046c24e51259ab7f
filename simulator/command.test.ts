import { describe, expect, it } from 'vitest';
import { parseCommand } from './command';
import { parseFaultSpec } from './faults';
import { generatedFleet } from './fleet';
import { mulberry32 } from './rng';

describe('purge command', () => {
	it('accepts the contract shape', () => {
		expect(parseCommand('{"id":"c-1","action":"purge","duration_s":12}')).toEqual({
			ok: true,
			command: { id: 'c-1', action: 'purge', duration_s: 12 }
		});
	});

	it.each([
		['not json', 'not JSON'],
		['[]', 'body'],
		['{"id":"c-1","action":"flush","duration_s":12}', 'action'],
		['{"id":"c-1","action":"purge","duration_s":-3}', 'duration_s'],
		['{"id":"c-1","action":"purge","duration_s":"12"}', 'duration_s'],
		['{"action":"purge","duration_s":12}', 'id']
	])('rejects %s with a reason naming %s', (payload, where) => {
		const parsed = parseCommand(Buffer.from(payload));
		expect(parsed.ok).toBe(false);
		expect(!parsed.ok && parsed.reason).toContain(where);
	});
});

describe('fault notation', () => {
	it('reads name:vessel and name:vessel/shaft', () => {
		expect(parseFaultSpec('pump-trip:corrin-bay/port')).toEqual({
			fault: 'pump-trip',
			vessel: 'corrin-bay',
			shaft: 'port'
		});
		expect(parseFaultSpec('offline:skerry-lark')).toEqual({
			fault: 'offline',
			vessel: 'skerry-lark'
		});
	});

	it('rejects unknown faults, bad notation and shafts on vessel faults', () => {
		expect(() => parseFaultSpec('melt:corrin-bay')).toThrow(/unknown fault/);
		expect(() => parseFaultSpec('pump-trip')).toThrow(/expected/);
		expect(() => parseFaultSpec('clogging:hallow-tern/main')).toThrow(/whole vessel/);
	});
});

describe('generated fleet', () => {
	it('makes sim-001… vessels with 1–4 shafts of 150–600 mm, the same for the same seed', () => {
		const fleet = generatedFleet(40, 3);
		expect(fleet.map((v) => v.code).slice(0, 2)).toEqual(['sim-001', 'sim-002']);
		expect(fleet.at(-1)!.code).toBe('sim-040');
		for (const v of fleet) {
			expect(v.shafts.length).toBeGreaterThanOrEqual(1);
			expect(v.shafts.length).toBeLessThanOrEqual(4);
			expect(new Set(v.shafts.map((s) => s.code)).size).toBe(v.shafts.length);
			for (const s of v.shafts) {
				expect(s.diameter_mm).toBeGreaterThanOrEqual(150);
				expect(s.diameter_mm).toBeLessThanOrEqual(600);
			}
		}
		expect(new Set(fleet.map((v) => v.shafts.length)).size).toBeGreaterThan(2);
		expect(generatedFleet(40, 3)).toEqual(fleet);
	});
});

describe('mulberry32', () => {
	it('gives uniform numbers in [0, 1) with a mean near one half', () => {
		const rng = mulberry32(123);
		const xs = Array.from({ length: 10_000 }, rng);
		expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
		expect(Math.max(...xs)).toBeLessThan(1);
		expect(Math.abs(xs.reduce((a, b) => a + b, 0) / xs.length - 0.5)).toBeLessThan(0.01);
	});
});
