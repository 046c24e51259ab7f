/**
 * The vessels the simulator plays: the demo fleet (with the sea temperature
 * of each home water, so the numbers look right for the place), or N
 * generated vessels for load tests.
 */
import { DEMO_VESSELS } from '../src/lib/server/demo/fleet';
import type { SimShaft, SimVessel } from './model';
import { mulberry32, subSeed, uniform, type Rng } from './rng';

/** Typical surface water temperature of each demo vessel's home water, °C (fictional voyages). */
const DEMO_SEA_TEMP_C: Record<string, number> = {
	'corrin-bay': 8, // Norwegian coast
	'hallow-tern': 29, // Singapore Strait
	'lakeline-wren': 12, // Great Lakes
	'skerry-lark': 17 // off Lisbon
};

export function demoFleet(): SimVessel[] {
	return DEMO_VESSELS.map((v) => ({
		code: v.code,
		water: v.water,
		salinity_psu: v.salinity_psu,
		sea_temp_c: DEMO_SEA_TEMP_C[v.code],
		shafts: v.shafts.map((s) => ({
			code: s.code,
			diameter_mm: s.diameter_mm,
			centreline_depth_m: s.centreline_depth_m
		}))
	}));
}

const SHAFT_CODES: Record<number, string[]> = {
	1: ['main'],
	2: ['port', 'stbd'],
	3: ['port', 'centre', 'stbd'],
	4: ['port-outer', 'port-inner', 'stbd-inner', 'stbd-outer']
};

/** Vessel codes sim-001 … sim-NNN (at least three digits, so they sort). */
export function generatedCode(index: number, count: number): string {
	const width = Math.max(3, String(count).length);
	return `sim-${String(index + 1).padStart(width, '0')}`;
}

/** `count` generated vessels with 1–4 shafts each, 150–600 mm, reproducible from the seed. */
export function generatedFleet(count: number, seed: number): SimVessel[] {
	if (!Number.isInteger(count) || count < 1)
		throw new RangeError('vessel count must be a whole number ≥ 1');
	const vessels: SimVessel[] = [];
	for (let i = 0; i < count; i++) {
		const code = generatedCode(i, count);
		const rng = mulberry32(subSeed(seed, `fleet:${code}`));
		const shaftCount = 1 + Math.floor(rng() * 4);
		const water = rng() < 0.2 ? 'fresh' : 'sea';
		const diameter = Math.round(uniform(rng, 150, 600) / 10) * 10;
		vessels.push({
			code,
			water,
			salinity_psu: water === 'sea' ? Math.round(uniform(rng, 30, 36)) : null,
			sea_temp_c: Math.round(uniform(rng, 4, 30)),
			shafts: SHAFT_CODES[shaftCount].map((c) => generatedShaft(c, diameter, rng))
		});
	}
	return vessels;
}

function generatedShaft(code: string, diameterMm: number, rng: Rng): SimShaft {
	// Bigger shafts belong to bigger, deeper ships: about 1 m of centreline depth per 80 mm.
	const depth = Math.round((diameterMm / 80) * uniform(rng, 0.85, 1.15) * 10) / 10;
	return { code, diameter_mm: diameterMm, centreline_depth_m: depth };
}
