import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { Debouncer, debounceStep, INITIAL_DEBOUNCE_STATE, type DebounceOutput } from './debounce';

// ISA-18.2 (2009) guidance table [memory]: flow on/off delay 15 s, deadband 5 %.
const FLOW = { on_s: 15, off_s: 15 };
const MIN = 63; // L/min: 420 mm × 0.15 L/min per mm (common practice)
const CLEAR_AT = MIN * 1.05; // 66.15 L/min

/** Feeds flows one per second from t = 0 s; returns the outputs with their times in s. */
function feed(d: Debouncer, flows: number[], t0 = 0) {
	const out: [number, DebounceOutput][] = [];
	flows.forEach((q, i) => {
		const t = t0 + i;
		const o = d.update(t * 1000, q < MIN, q >= CLEAR_AT);
		if (o) out.push([t, o]);
	});
	return out;
}

const repeat = (q: number, n: number) => Array<number>(n).fill(q);

describe('on-delay', () => {
	it('a dip shorter than the on-delay raises nothing', () => {
		// 15 samples at 1 s span 14 s of tripping: one short of the 15 s on-delay
		const d = new Debouncer(FLOW);
		expect(feed(d, [...repeat(70, 5), ...repeat(60, 15), ...repeat(70, 30)])).toEqual([]);
		expect(d.active).toBe(false);
	});

	it('a long dip raises once, exactly 15 s after it began', () => {
		const d = new Debouncer(FLOW);
		// dip from t = 5 s to t = 64 s
		expect(feed(d, [...repeat(70, 5), ...repeat(60, 60)])).toEqual([[20, 'raise']]);
	});

	it('a break in the dip restarts the on-delay', () => {
		const d = new Debouncer(FLOW);
		// 10 s tripping, one sample inside the deadband (64 L/min), then 15 s more
		const out = feed(d, [...repeat(60, 10), 64, ...repeat(60, 16)]);
		expect(out).toEqual([[26, 'raise']]); // 11 + 15
	});

	it('a zero delay acts on the first sample', () => {
		const d = new Debouncer({ on_s: 0, off_s: 0 });
		expect(feed(d, [70, 60, 60, 70])).toEqual([
			[1, 'raise'],
			[3, 'clear']
		]);
	});
});

describe('deadband and off-delay', () => {
	it('hovering around the setpoint after a raise neither clears nor raises again', () => {
		const d = new Debouncer(FLOW);
		const hover = Array.from({ length: 120 }, (_, i) => [62.5, 63.5, 65.9, 63][i % 4]);
		expect(feed(d, [...repeat(60, 16), ...hover])).toEqual([[15, 'raise']]);
		expect(d.active).toBe(true);
	});

	it('clears once flow has stayed at minimum × 1.05 for the off-delay', () => {
		// 63 × (1 + 0.05) = 66.15 L/min; 66.1 is inside the deadband, 66.15 clears
		const d = new Debouncer(FLOW);
		const out = feed(d, [...repeat(60, 16), ...repeat(66.1, 10), ...repeat(66.15, 20)]);
		expect(out).toEqual([
			[15, 'raise'],
			[41, 'clear'] // clearing from t = 26 s, + 15 s
		]);
	});

	it('a brief return inside the off-delay does not clear, and restarts the off-delay', () => {
		const d = new Debouncer(FLOW);
		// raised at 15 s; back to 70 L/min for 10 s (16…25 s), down again 26…30 s, back from 31 s
		const out = feed(d, [
			...repeat(60, 16),
			...repeat(70, 10),
			...repeat(60, 5),
			...repeat(70, 20)
		]);
		expect(out).toEqual([
			[15, 'raise'],
			[46, 'clear'] // 31 + 15
		]);
	});
});

describe('state', () => {
	it('is a plain object that survives JSON and carries on where it left off', () => {
		const d = new Debouncer(FLOW);
		feed(d, repeat(60, 10)); // t = 0…9 s tripping
		const saved = JSON.parse(JSON.stringify(d));
		expect(saved).toEqual({ active: false, trip_since: 0, clear_since: null, last_at: 9000 });
		const resumed = new Debouncer(FLOW, saved);
		expect(feed(resumed, repeat(60, 10), 10)).toEqual([[15, 'raise']]);
	});

	it('ignores a sample older than the latest', () => {
		const { state, output } = debounceStep(
			{ ...INITIAL_DEBOUNCE_STATE, last_at: 10_000 },
			{ on_s: 0, off_s: 0 },
			9_000,
			true,
			false
		);
		expect(output).toBeNull();
		expect(state.active).toBe(false);
	});

	it('fails safe when tripping and clearing are both claimed', () => {
		const d = new Debouncer({ on_s: 0, off_s: 0 });
		expect(d.update(0, true, true)).toBe('raise');
		expect(d.update(1000, true, true)).toBeNull();
	});
});

describe('properties (fast-check)', () => {
	const sample = fc.record({
		dt: fc.integer({ min: 0, max: 20_000 }), // ms to the next sample
		tripping: fc.boolean(),
		clearing: fc.boolean()
	});
	const delays = fc.record({
		on_s: fc.integer({ min: 0, max: 30 }),
		off_s: fc.integer({ min: 0, max: 30 })
	});

	it('outputs alternate raise, clear, raise… and each matches its condition', () => {
		fc.assert(
			fc.property(delays, fc.array(sample, { maxLength: 300 }), (dl, samples) => {
				const d = new Debouncer(dl);
				let t = 0;
				let last: DebounceOutput = 'clear';
				for (const s of samples) {
					t += s.dt;
					const o = d.update(t, s.tripping, s.clearing);
					if (o === null) continue;
					expect(o).not.toBe(last);
					if (o === 'raise') expect(s.tripping).toBe(true);
					else expect(s.clearing && !s.tripping).toBe(true);
					expect(d.active).toBe(o === 'raise');
					last = o;
				}
			})
		);
	});
});
