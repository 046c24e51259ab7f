/**
 * The telemetry contract (v1), as zod schemas: what a gateway may send.
 * Ranges here are physical limits of what a sensor can report — outside them
 * a message is rejected. Values inside but implausible for a stern tube
 * (a 95 °C bearing supply, say) are stored and flagged by the sensor_fault
 * alarm instead, so nothing that might be real is thrown away.
 */
import { z } from 'zod';

/** 2000-01-01T00:00:00Z: anything earlier is a gateway whose clock was never set */
const EARLIEST_TS = 946_684_800_000;

const isoWithZone = z.iso.datetime({ offset: true, message: 'ISO 8601 with a time zone (Z or ±hh:mm)' });

export const timestamp = z
	.union([z.number().int('epoch milliseconds, an integer'), isoWithZone])
	.transform((v) => (typeof v === 'number' ? v : Date.parse(v)))
	.refine((ms) => ms >= EARLIEST_TS, 'before the year 2000: is the gateway clock set?');

const reading = (min: number, max: number, unit: string) =>
	z.number().min(min, `below ${min} ${unit}`).max(max, `above ${max} ${unit}`);

export const telemetryPayload = z.object({
	ts: timestamp,
	flow_lpm: z.number().min(0, 'a flow cannot be negative').max(1_000_000, 'above 1 000 000 L/min'),
	supply_bar: reading(-1.1, 1000, 'bar').nullish(),
	temp_c: reading(-60, 400, '°C').nullish(),
	shaft_rpm: reading(-5000, 5000, 'rpm').nullish()
});
export type TelemetryPayload = z.output<typeof telemetryPayload>;

export const separatorStatePayload = z
	.object({
		ts: timestamp,
		dp_bar: reading(-10, 100, 'bar').nullish(),
		purge_valve: z.enum(['open', 'closed']).nullish()
	})
	.refine((s) => s.dp_bar != null || s.purge_valve != null, 'needs dp_bar or purge_valve');
export type SeparatorStatePayload = z.output<typeof separatorStatePayload>;

export const gatewayStatusPayload = z.object({
	online: z.boolean(),
	ts: timestamp.optional()
});
export type GatewayStatusPayload = z.output<typeof gatewayStatusPayload>;

export type TopicKind = 'telemetry' | 'separator_state' | 'separator_command' | 'gateway_status';

export interface ParsedTopic {
	vessel: string;
	shaft?: string;
	kind: TopicKind;
}

/**
 * {prefix}/{vessel}/{shaft}/telemetry · {prefix}/{vessel}/separator/state ·
 * {prefix}/{vessel}/separator/command · {prefix}/{vessel}/gateway/status
 */
export function parseTopic(prefix: string, topic: string): ParsedTopic | null {
	if (!topic.startsWith(prefix + '/')) return null;
	const parts = topic.slice(prefix.length + 1).split('/');
	if (parts.length !== 3) return null;
	const [vessel, second, third] = parts;
	if (second === 'separator' && third === 'state') return { vessel, kind: 'separator_state' };
	if (second === 'separator' && third === 'command') return { vessel, kind: 'separator_command' };
	if (second === 'gateway' && third === 'status') return { vessel, kind: 'gateway_status' };
	if (third === 'telemetry') return { vessel, shaft: second, kind: 'telemetry' };
	return null;
}

export const topics = (prefix: string, vessel: string) => ({
	telemetry: (shaft: string) => `${prefix}/${vessel}/${shaft}/telemetry`,
	separatorState: `${prefix}/${vessel}/separator/state`,
	separatorCommand: `${prefix}/${vessel}/separator/command`,
	gatewayStatus: `${prefix}/${vessel}/gateway/status`
});
