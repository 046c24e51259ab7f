/** An MQTT.js client signed in as a demo vessel's gateway, for ingest tests. */
import mqtt, { type MqttClient } from 'mqtt';
import { DEMO_PASSWORD } from './http';
import { demoGatewayPassword, gatewayUsername } from '$lib/server/demo/fleet';

export const PREFIX = 'aftwater/v1';

export async function connectGateway(
	port: number,
	vessel: string,
	options: {
		password?: string;
		clientId?: string;
		will?: boolean;
		clean?: boolean;
		/** listening from before the CONNACK, so messages of a restored session are seen too */
		onMessage?: (topic: string, payload: Buffer) => void;
	} = {}
): Promise<MqttClient> {
	const client = mqtt.connect(`mqtt://127.0.0.1:${port}`, {
		username: gatewayUsername(vessel),
		password: options.password ?? demoGatewayPassword(vessel, DEMO_PASSWORD),
		clientId: options.clientId ?? `test-${vessel}-${Math.random().toString(36).slice(2, 8)}`,
		reconnectPeriod: 0,
		connectTimeout: 5_000,
		clean: options.clean ?? true,
		will: options.will
			? { topic: `${PREFIX}/${vessel}/gateway/status`, payload: Buffer.from('{"online":false}'), qos: 1, retain: true }
			: undefined
	});
	if (options.onMessage) client.on('message', options.onMessage);
	await new Promise<void>((resolve, reject) => {
		client.once('connect', () => resolve());
		client.once('error', reject);
	});
	return client;
}

export function telemetry(vessel: string, shaft: string) {
	return `${PREFIX}/${vessel}/${shaft}/telemetry`;
}
