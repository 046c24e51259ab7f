/**
 * Where the ingest pipeline's messages come from, and how the server
 * publishes commands: the embedded broker in process (twice the headroom of
 * a loopback client; PERFORMANCE.md), or an MQTT.js client of any external
 * broker, with a persistent session (clean: false, QoS 1) so what was
 * published while the server was away is delivered when it returns.
 */
import mqtt, { type MqttClient } from 'mqtt';
import type { Aedes } from 'aedes';

export interface MessageSource {
	readonly kind: 'embedded' | 'external';
	/** publish at QoS 1; resolves when the broker has it */
	publish(topic: string, payload: string, options?: { retain?: boolean }): Promise<void>;
	connected(): boolean;
	stop(): Promise<void>;
}

export type MessageHandler = (topic: string, payload: Buffer) => void;

/** The topics the server reads: telemetry, separator state, gateway status of every vessel. */
export const subscriptions = (prefix: string) => [
	`${prefix}/+/+/telemetry`,
	`${prefix}/+/separator/state`,
	`${prefix}/+/gateway/status`
];

export async function embeddedSource(aedes: Aedes, prefix: string, onMessage: MessageHandler): Promise<MessageSource> {
	const deliver = (packet: { topic: string; payload: Buffer | string }, done: () => void) => {
		onMessage(packet.topic, typeof packet.payload === 'string' ? Buffer.from(packet.payload) : packet.payload);
		done();
	};
	const topics = subscriptions(prefix);
	for (const t of topics) await new Promise<void>((r) => aedes.subscribe(t, deliver, r));
	return {
		kind: 'embedded',
		publish: (topic, payload, options = {}) =>
			new Promise((resolve, reject) =>
				aedes.publish(
					{ cmd: 'publish', topic, payload: Buffer.from(payload), qos: 1, retain: !!options.retain, dup: false },
					(err) => (err ? reject(err) : resolve())
				)
			),
		connected: () => !aedes.closed,
		async stop() {
			for (const t of topics) await new Promise<void>((r) => aedes.unsubscribe(t, deliver, r));
		}
	};
}

export interface ExternalOptions {
	url: string;
	prefix: string;
	username?: string;
	password?: string;
	/** fixed, so the broker keeps this subscriber's session between restarts */
	clientId: string;
}

export async function externalSource(options: ExternalOptions, onMessage: MessageHandler): Promise<MessageSource> {
	const client: MqttClient = mqtt.connect(options.url, {
		clientId: options.clientId,
		clean: false,
		username: options.username,
		password: options.password,
		reconnectPeriod: 2_000, // ms
		connectTimeout: 10_000,
		keepalive: 30 // s
	});
	client.on('message', (topic, payload) => onMessage(topic, payload));
	client.on('error', (err) => console.error(`[aftwater] mqtt (${options.url}): ${err.message}`));
	await new Promise<void>((resolve, reject) => {
		client.once('connect', () => resolve());
		client.once('error', reject);
	});
	// With a persistent session the broker remembers the subscriptions; subscribing
	// again is harmless and covers a broker that lost its state.
	await client.subscribeAsync(subscriptions(options.prefix), { qos: 1 });
	return {
		kind: 'external',
		async publish(topic, payload, opts = {}) {
			await client.publishAsync(topic, payload, { qos: 1, retain: !!opts.retain });
		},
		connected: () => client.connected,
		async stop() {
			await client.endAsync();
		}
	};
}
