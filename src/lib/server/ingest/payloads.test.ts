import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fastTelemetry, parseTopic, telemetryPayload } from './payloads';

const PREFIX = 'aftwater/v1';

describe('fastTelemetry: the zod-free path accepts exactly what the schema accepts, the same way', () => {
	const reading = fc.oneof(
		fc.double({ noNaN: false }),
		fc.integer({ min: -6000, max: 6000 }),
		fc.constant(null),
		fc.constant(undefined),
		fc.string({ maxLength: 3 })
	);
	const body = fc.record(
		{
			ts: fc.oneof(fc.integer({ min: 0, max: 2_000_000_000_000 }), fc.double(), fc.constant('2026-12-01T10:00:00Z'), fc.constant(null)),
			flow_lpm: reading,
			supply_bar: reading,
			temp_c: reading,
			shaft_rpm: reading
		},
		{ requiredKeys: [] }
	);

	it('never accepts what zod refuses, and agrees on what it accepts (property)', () => {
		fc.assert(
			fc.property(body, (b) => {
				const fast = fastTelemetry(b as Record<string, unknown>);
				const slow = telemetryPayload.safeParse(b);
				if (fast === undefined) return true; // the caller falls back to zod
				expect(slow.success).toBe(true);
				if (!slow.success) return false;
				expect({ ...fast }).toEqual(Object.fromEntries(Object.entries(slow.data).filter(([, v]) => v !== undefined)));
				return true;
			}),
			{ numRuns: 5000 }
		);
	});

	it('takes the common shape without zod', () => {
		expect(fastTelemetry({ ts: 1_796_000_000_000, flow_lpm: 80, supply_bar: 1.2 })).toMatchObject({ flow_lpm: 80, supply_bar: 1.2 });
		expect(fastTelemetry({ ts: '2026-12-01T10:00:00Z', flow_lpm: 80 })).toBeUndefined(); // zod parses ISO times
		expect(fastTelemetry({ ts: 1_796_000_000_000, flow_lpm: -1 })).toBeUndefined(); // zod says why
	});
});

describe('parseTopic', () => {
	it.each([
		[`${PREFIX}/corrin-bay/port/telemetry`, { vessel: 'corrin-bay', shaft: 'port', kind: 'telemetry' }],
		[`${PREFIX}/corrin-bay/separator/state`, { vessel: 'corrin-bay', kind: 'separator_state' }],
		[`${PREFIX}/corrin-bay/separator/command`, { vessel: 'corrin-bay', kind: 'separator_command' }],
		[`${PREFIX}/corrin-bay/gateway/status`, { vessel: 'corrin-bay', kind: 'gateway_status' }]
	])('%s', (topic, expected) => {
		expect(parseTopic(PREFIX, topic)).toEqual(expected);
	});

	it.each([`${PREFIX}/corrin-bay/port`, `${PREFIX}/corrin-bay/port/readings`, `other/v1/x/y/telemetry`, `${PREFIX}/a/b/c/telemetry`, `${PREFIX}//port/telemetry`])(
		'refuses %s',
		(topic) => {
			const parsed = parseTopic(PREFIX, topic);
			expect(parsed === null || parsed.vessel === '').toBe(true);
		}
	);
});
