/**
 * In demo mode the gateway simulator plays the demo fleet against the broker
 * in use, through real MQTT with each vessel's gateway credentials, exactly
 * as a vessel's gateway would. Never started outside demo mode (or with
 * SIMULATOR=off).
 */
import { startSimulator } from '../../../../simulator/simulator';
import type { AppContext } from '../context';
import { simulatorWanted } from '../config';
import type { Stoppable } from '../services';

export async function startDemoSimulator(ctx: AppContext): Promise<Stoppable | null> {
	const { config } = ctx;
	if (!simulatorWanted(config)) return null;
	const telemetry = ctx.services.telemetry;
	const url = config.MQTT_URL ?? `mqtt://127.0.0.1:${telemetry?.broker?.port ?? config.MQTT_PORT}`;
	const sim = await startSimulator({
		url,
		prefix: config.MQTT_TOPIC_PREFIX,
		demoPassword: config.DEMO_PASSWORD,
		timetable: true,
		log: (line) => console.log(`[simulator] ${line}`)
	});
	return sim;
}
