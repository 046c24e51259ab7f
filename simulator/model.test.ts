import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { minimumFlow } from '../src/lib/flow';
import { seaPressureAtCentreline } from '../src/lib/seawater';
import { demoFleet } from './fleet';
import { VesselModel, type SimVessel } from './model';

const fleet = demoFleet();
const vessel = (code: string): SimVessel => fleet.find((v) => v.code === code)!;

/** Steps `model` for `seconds` in steps of `dtS`, calling `each` after every step. */
function run(model: VesselModel, seconds: number, dtS = 0.5, each?: (t: number) => void): void {
	for (let t = dtS; t <= seconds + 1e-9; t += dtS) {
		model.step(dtS);
		each?.(t);
	}
}

describe('pump trip', () => {
	it('drops the flow below the shaft minimum within seconds and recovers when the standby pump starts', () => {
		const model = new VesselModel(vessel('corrin-bay'), 1);
		const port = model.shaft('port');
		// 0.15 L/min per mm × 420 mm (common practice rule, DESIGN.md §3)
		expect(port.minFlowLpm).toBeCloseTo(63, 9);
		run(model, 30);
		expect(port.flowLpm).toBeGreaterThan(1.5 * port.minFlowLpm);

		model.setFault('pump-trip', true, 'port');
		run(model, 5);
		expect(model.readShaft('port').flow_lpm).toBeLessThan(port.minFlowLpm);
		run(model, 38); // 43 s after the trip: still waiting for the standby pump (45 s)
		expect(port.pump).toBe('none');
		expect(port.flowLpm).toBeLessThan(0.2 * port.minFlowLpm);
		// The other shaft has its own pump and keeps its flow.
		expect(model.shaft('stbd').flowLpm).toBeGreaterThan(1.5 * model.shaft('stbd').minFlowLpm);

		run(model, 12); // 55 s: standby running for 10 s
		expect(port.pump).toBe('standby');
		expect(model.readShaft('port').flow_lpm).toBeGreaterThan(1.5 * port.minFlowLpm);
	});

	it('honours a shorter standby start delay', () => {
		const model = new VesselModel(vessel('corrin-bay'), 1, { standbyDelayS: 10 });
		model.setFault('pump-trip', true, 'port');
		run(model, 5);
		expect(model.shaft('port').flowLpm).toBeLessThan(63);
		run(model, 15);
		expect(model.shaft('port').flowLpm).toBeGreaterThan(63);
	});

	it('drops the supply pressure to about the sea pressure at the centreline', () => {
		const model = new VesselModel(vessel('hallow-tern'), 3);
		model.setFault('pump-trip', true);
		run(model, 20);
		// ρ g h with 1025 kg/m³ and 7.5 m: 0.754 bar; waves and draft move it a little.
		const sea = seaPressureAtCentreline(7.5, 'sea');
		expect(model.shaft('main').supplyBar).toBeGreaterThan(sea - 0.5);
		expect(model.shaft('main').supplyBar).toBeLessThan(sea + 0.05 + 0.4);
	});
});

describe('healthy supply', () => {
	it('gives every demo shaft 1.5–2.5 × its minimum flow and 0.4–1.6 bar above sea pressure', () => {
		fc.assert(
			fc.property(fc.integer({ min: 0, max: 2 ** 31 }), (seed) => {
				for (const spec of fleet) {
					const model = new VesselModel(spec, seed);
					run(model, 20, 1);
					for (const s of spec.shafts) {
						const shaft = model.shaft(s.code);
						const ratio = shaft.flowLpm / minimumFlow(s.diameter_mm);
						const sea = seaPressureAtCentreline(s.centreline_depth_m, spec.water);
						expect(ratio).toBeGreaterThan(1.5);
						expect(ratio).toBeLessThan(2.5);
						expect(shaft.supplyBar - sea).toBeGreaterThan(0.4);
						expect(shaft.supplyBar - sea).toBeLessThan(1.6);
					}
				}
			}),
			{ numRuns: 25 }
		);
	});

	it('warms the water more with the shaft turning than stopped in port', () => {
		const steaming = new VesselModel(vessel('skerry-lark'), 5);
		const port = new VesselModel(vessel('skerry-lark'), 5);
		steaming.voyage.pin('steaming');
		port.voyage.pin('port');
		run(steaming, 600, 1);
		run(port, 600, 1);
		expect(port.readShaft('port').shaft_rpm).toBe(0);
		expect(steaming.readShaft('port').shaft_rpm).toBeGreaterThan(200);
		expect(steaming.shaft('port').tempC - port.shaft('port').tempC).toBeGreaterThan(1);
		// sea temperature 17 °C for this vessel's home water
		expect(port.shaft('port').tempC).toBeCloseTo(17.2, 1);
	});
});

describe('separator', () => {
	it('builds up ΔP over hours and loses most of it in a purge', () => {
		const model = new VesselModel(vessel('hallow-tern'), 2);
		const start = model.separator.dpBar;
		run(model, 3 * 3600, 2);
		const before = model.separator.dpBar;
		// 0.2 bar/h of sediment for 3 h, carried by a flow near design
		expect(before - start).toBeGreaterThan(0.4);
		expect(before - start).toBeLessThan(0.8);

		expect(model.purge(10)).toBe('opened');
		expect(model.readSeparator().purge_valve).toBe('open');
		const changes: (string | null)[] = [];
		for (let t = 0; t < 12; t += 0.5) changes.push(model.step(0.5));
		expect(changes.filter((c) => c !== null)).toEqual(['closed']);
		expect(model.readSeparator().purge_valve).toBe('closed');
		expect(model.separator.dpBar).toBeLessThan(0.5 * before);
	});

	it('clogs much faster with the clogging fault, and the flow falls somewhat', () => {
		const normal = new VesselModel(vessel('hallow-tern'), 4);
		const clogging = new VesselModel(vessel('hallow-tern'), 4);
		const dp0 = clogging.separator.dpBar;
		const flow0 = clogging.shaft('main').flowLpm;
		clogging.setFault('clogging', true);
		run(normal, 300, 1);
		run(clogging, 300, 1);
		const riseNormal = normal.separator.dpBar - dp0;
		const riseClogging = clogging.separator.dpBar - dp0;
		expect(riseClogging).toBeGreaterThan(0.5);
		expect(riseClogging).toBeGreaterThan(10 * riseNormal);
		const flow = clogging.shaft('main').flowLpm;
		expect(flow).toBeLessThan(0.95 * flow0);
		expect(flow).toBeGreaterThan(clogging.shaft('main').minFlowLpm);
	});

	it('ignores purge commands with the valve stuck shut', () => {
		const model = new VesselModel(vessel('lakeline-wren'), 1);
		model.setFault('stuck-valve', true);
		expect(model.purge(10)).toBe('ignored');
		run(model, 5);
		expect(model.readSeparator().purge_valve).toBe('closed');
		model.setFault('stuck-valve', false);
		expect(model.purge(10)).toBe('opened');
	});

	it('keeps a valve stuck open long after the purge should have ended', () => {
		const model = new VesselModel(vessel('corrin-bay'), 1, { stuckOpenS: 300 });
		model.setFault('valve-stuck-open', true);
		expect(model.purge(10)).toBe('opened');
		run(model, 200);
		expect(model.separator.valve).toBe('open');
		// The diverted water shows as a lower flow to the bearings while it is open.
		const open = model.shaft('port').flowLpm;
		run(model, 110);
		expect(model.separator.valve).toBe('closed');
		run(model, 10);
		expect(model.shaft('port').flowLpm).toBeGreaterThan(open);
	});
});

describe('sensor faults', () => {
	it('a dead sensor repeats one exact value while the true flow changes', () => {
		const model = new VesselModel(vessel('skerry-lark'), 9);
		const live: number[] = [];
		run(model, 10, 0.5, () => live.push(model.readShaft('stbd').flow_lpm));
		expect(new Set(live).size).toBeGreaterThan(1);

		model.setFault('dead-sensor', true, 'stbd');
		model.setFault('pump-trip', true, 'stbd'); // the true flow collapses underneath it
		const dead: number[] = [];
		run(model, 20, 0.5, () => dead.push(model.readShaft('stbd').flow_lpm));
		expect(new Set(dead).size).toBe(1);
		expect(dead[0]).toBe(live.at(-1));
		expect(model.shaft('stbd').flowLpm).toBeLessThan(0.5 * dead[0]);
		// the other shaft's sensor is alive
		const other = [model.readShaft('port').flow_lpm, model.readShaft('port').flow_lpm];
		expect(other[0]).not.toBe(other[1]);
	});

	it('a drifting sensor moves further from the true flow as time goes on', () => {
		const model = new VesselModel(vessel('corrin-bay'), 11);
		model.setFault('drifting-sensor', true, 'stbd');
		const error = () => {
			const readings = Array.from({ length: 20 }, () => model.readShaft('stbd').flow_lpm);
			const mean = readings.reduce((a, b) => a + b, 0) / readings.length;
			return Math.abs(mean / model.shaft('stbd').flowLpm - 1);
		};
		run(model, 120, 1);
		const early = error();
		run(model, 480, 1);
		const late = error();
		expect(early).toBeGreaterThan(0.02);
		expect(late).toBeGreaterThan(0.15); // 2 % per minute for 10 minutes
		expect(late).toBeGreaterThan(3 * early);
		model.setFault('drifting-sensor', false, 'stbd');
		expect(error()).toBeLessThan(0.02);
	});
});

describe('reproducibility', () => {
	const trace = (seed: number) => {
		const model = new VesselModel(vessel('corrin-bay'), seed);
		const out: unknown[] = [];
		run(model, 120, 0.25, (t) => {
			if (t === 30) model.setFault('pump-trip', true, 'port');
			if (t % 5 === 0)
				out.push(model.readShaft('port'), model.readShaft('stbd'), model.readSeparator());
		});
		return out;
	};

	it('repeats a run exactly from the same seed, and differs with another', () => {
		expect(trace(42)).toEqual(trace(42));
		expect(trace(42)).not.toEqual(trace(43));
	});
});
