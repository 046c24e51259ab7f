/**
 * What a gateway maker needs besides the credentials: where the broker is and
 * which topics the gateway publishes and subscribes to (DESIGN.md §4, v1).
 */
import type { AppContext } from '../context';

export interface GatewayConnection {
	/** mqtt://host:port, never with a username or password in it */
	broker_url: string;
	/** true when the address is this server's embedded broker */
	embedded: boolean;
	/** the embedded broker listens only on this machine (MQTT_HOST is a loopback address) */
	loopback: boolean;
	topic_prefix: string;
	publish: string[];
	subscribe: string[];
}

export function gatewayConnection(
	ctx: AppContext,
	vesselCode: string,
	pageUrl: URL
): GatewayConnection {
	const { config } = ctx;
	let broker_url: string;
	let loopback = false;
	if (config.MQTT_URL) {
		const url = new URL(config.MQTT_URL);
		url.username = '';
		url.password = '';
		broker_url = url.toString().replace(/\/$/, '');
	} else {
		// the embedded broker listens on MQTT_HOST (often 0.0.0.0, which names no
		// machine): the host this page was opened on is the best guess of the address
		const host =
			config.MQTT_HOST === '0.0.0.0' || config.MQTT_HOST === '::'
				? pageUrl.hostname
				: config.MQTT_HOST;
		loopback = /^(127\.|localhost$|::1$)/.test(config.MQTT_HOST);
		// an IPv6 literal goes in brackets (URL.hostname already has them)
		const literal = host.includes(':') && !host.startsWith('[') ? `[${host}]` : host;
		broker_url = `mqtt://${literal}:${config.MQTT_PORT}`;
	}
	const base = `${config.MQTT_TOPIC_PREFIX}/${vesselCode}`;
	return {
		broker_url,
		embedded: !config.MQTT_URL,
		loopback,
		topic_prefix: config.MQTT_TOPIC_PREFIX,
		publish: [`${base}/{shaft}/telemetry`, `${base}/separator/state`, `${base}/gateway/status`],
		subscribe: [`${base}/separator/command`]
	};
}
