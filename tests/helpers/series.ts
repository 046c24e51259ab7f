/** Publishing a run of telemetry with chosen timestamps, for rule tests. */
import type { MqttClient } from 'mqtt';
import { telemetry } from './gateway';

export interface Point {
	/** seconds after the series' start */
	t: number;
	flow_lpm: number;
	supply_bar?: number;
	temp_c?: number;
	shaft_rpm?: number;
}

/** Points every `stepS` seconds from `fromS` to `toS`, with the same readings. */
export function steady(fromS: number, toS: number, readings: Omit<Point, 't'>, stepS = 1): Point[] {
	const out: Point[] = [];
	for (let t = fromS; t <= toS; t += stepS) out.push({ t, ...readings });
	return out;
}

export async function publishSeries(gw: MqttClient, vessel: string, shaft: string, startMs: number, points: Point[]) {
	for (const { t, ...readings } of points) {
		await gw.publishAsync(telemetry(vessel, shaft), JSON.stringify({ ts: startMs + t * 1000, ...readings }), { qos: 1 });
	}
}
