import { describe, expect, it } from 'vitest';
import { shaftCreate, shaftUpdate, vesselCreate, vesselUpdate } from './fleet';

describe('fleet input shapes', () => {
	it('fill defaults on create', () => {
		const s = shaftCreate.parse({ code: 'port', name: 'Port', diameter_mm: 420 });
		expect(s).toMatchObject({ position: 'centre', water: 'sea', centreline_depth_m: 0, min_flow_factor_lpm_per_mm: 0.15 });
		expect(vesselCreate.parse({ code: 'v', name: 'V' }).time_zone).toBe('UTC');
	});

	it('leave unnamed fields alone on update', () => {
		expect(shaftUpdate.parse({ name: 'Port shaft' })).toEqual({ name: 'Port shaft' });
		expect(vesselUpdate.parse({ name: 'New name' })).toEqual({ name: 'New name' });
	});

	it('refuse codes that would clash with topics or paths', () => {
		expect(shaftCreate.safeParse({ code: 'separator', name: 'x', diameter_mm: 300 }).success).toBe(false);
		expect(shaftCreate.safeParse({ code: 'Port Side', name: 'x', diameter_mm: 300 }).success).toBe(false);
		expect(vesselCreate.safeParse({ code: '-bad', name: 'x' }).success).toBe(false);
		expect(vesselCreate.safeParse({ code: 'corrin-bay', name: 'x', time_zone: 'Mars/Olympus' }).success).toBe(false);
	});
});
