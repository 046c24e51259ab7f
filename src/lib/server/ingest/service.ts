/**
 * Telemetry as one running part: the broker (embedded unless MQTT_URL is
 * set), the message source, the pipeline and its writer thread, retention.
 */
import { createHash } from 'node:crypto';
import type { AppContext } from '../context';
import { GatewayAuth } from '../mqtt/gateway-auth';
import { startEmbeddedBroker, type EmbeddedBroker } from '../mqtt/broker';
import { embeddedSource, externalSource, type MessageSource } from '../mqtt/sources';
import { IngestPipeline } from './pipeline';
import { Registry } from './registry';
import { WriterClient } from './writer-client';
import { loadLatest } from './latest';

export interface TelemetryService {
	pipeline: IngestPipeline;
	registry: Registry;
	source: MessageSource;
	broker: EmbeddedBroker | null;
	/** publish at QoS 1 through whichever broker is in use */
	publish(topic: string, payload: string, options?: { retain?: boolean }): Promise<void>;
	/** reload codes and minimum flows after a configuration change */
	reload(): Promise<void>;
	stop(): Promise<void>;
}

const RETENTION_EVERY_MS = 3_600_000; // hourly

export async function startTelemetry(ctx: AppContext): Promise<TelemetryService> {
	const { config, db } = ctx;
	const registry = new Registry();
	await registry.load(db);
	const writer = new WriterClient(config.DATABASE_PATH);
	await writer.ready;
	const configureWriter = () =>
		writer.configure(registry.shafts().map((s) => [s.id, s.minimums, s.gapMs]));
	configureWriter();
	const pipeline = new IngestPipeline(config, registry, writer);
	await loadLatest(db, pipeline);

	let broker: EmbeddedBroker | null = null;
	let source: MessageSource;
	const onMessage = (topic: string, payload: Buffer) => pipeline.handle(topic, payload);
	const auth = new GatewayAuth(db);
	try {
		if (config.MQTT_URL) {
			source = await externalSource(
				{
					url: config.MQTT_URL,
					prefix: config.MQTT_TOPIC_PREFIX,
					username: config.MQTT_USERNAME,
					password: config.MQTT_PASSWORD,
					// one stable session per database, so two Aftwaters on one broker do not share one
					clientId: `aftwater-${createHash('sha256').update(config.DATABASE_PATH).digest('hex').slice(0, 12)}`
				},
				onMessage
			);
		} else {
			// A fresh embedded broker has no clients: every gateway is offline until it signs in.
			for (const g of pipeline.gateway.values()) g.online = false;
			broker = await startEmbeddedBroker({
				host: config.MQTT_HOST,
				port: config.MQTT_PORT,
				prefix: config.MQTT_TOPIC_PREFIX,
				internalPassword: config.mqttInternalPassword,
				auth
			});
			source = await embeddedSource(broker.aedes, config.MQTT_TOPIC_PREFIX, onMessage);
		}
	} catch (err) {
		pipeline.stop();
		await writer.stop();
		await broker?.stop();
		throw new Error(`MQTT: ${String(err instanceof Error ? err.message : err)}`, { cause: err });
	}

	const reload = async () => {
		await registry.load(db);
		configureWriter();
	};
	const offConfig = ctx.events.on('config.changed', () => void reload());
	const offGateway = ctx.events.on('gateway.changed', ({ vesselId, username }) => {
		auth.invalidate(username);
		broker?.disconnectVessel(vesselId); // old credentials stop working now, not at the next reconnect
	});

	const retention = () =>
		writer.retention(Date.now() - config.RAW_RETENTION_DAYS * 86_400_000, config.REJECTED_LOG_SIZE);
	const retentionTimer = setInterval(retention, RETENTION_EVERY_MS);
	retentionTimer.unref();
	const firstRetention = setTimeout(retention, 30_000);
	firstRetention.unref();

	return {
		pipeline,
		registry,
		source,
		broker,
		publish: (topic, payload, options) => source.publish(topic, payload, options),
		reload,
		async stop() {
			offConfig();
			offGateway();
			clearInterval(retentionTimer);
			clearTimeout(firstRetention);
			await source.stop();
			pipeline.stop();
			await pipeline.drain();
			await writer.stop();
			await broker?.stop();
		}
	};
}
