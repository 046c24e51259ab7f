/**
 * The gateway simulator against a bare aedes broker that signs each gateway in
 * with the demo credentials and lets it publish only under its own vessel and
 * subscribe only to its own command topic — as the contract requires.
 */
import net from 'node:net';
import { Aedes, type AuthenticateError } from 'aedes';
import mqtt, { type MqttClient } from 'mqtt';
import { afterEach, describe, expect, it } from 'vitest';
import { DEMO_VESSELS, demoGatewayPassword } from '../src/lib/server/demo/fleet';
import { startSimulator, type Simulator, type SimulatorOptions } from '../simulator/simulator';
import { freePort, waitFor } from './helpers/ports';

const PREFIX = 'aftwater/v1';
const DEMO_PASSWORD = 'aftwater-demo';
const OBSERVER = { username: 'observer', password: 'observer-secret' };

interface Received {
	topic: string;
	body: Record<string, unknown>;
	retain: boolean;
	/** when the observer received it, epoch ms */
	at: number;
}

interface TestBroker {
	port: number;
	url: string;
	violations: string[];
	close(): Promise<void>;
}

async function startBroker(port?: number): Promise<TestBroker> {
	const violations: string[] = [];
	const vesselOf = (username: string | undefined) => username?.replace(/^gw-/, '');
	const broker = await Aedes.createBroker({
		authenticate: (client, username, password, done) => {
			const pass = password?.toString();
			const vessel = DEMO_VESSELS.find((v) => `gw-${v.code}` === username);
			const ok = vessel
				? pass === demoGatewayPassword(vessel.code, DEMO_PASSWORD)
				: username === OBSERVER.username && pass === OBSERVER.password;
			if (ok) {
				(client as unknown as { user: string }).user = username!;
				return done(null, true);
			}
			const err = new Error('bad username or password') as AuthenticateError;
			err.returnCode = 4;
			done(err, false);
		},
		authorizePublish: (client, packet, done) => {
			const user = (client as unknown as { user?: string } | null)?.user;
			if (user === OBSERVER.username) return done(null);
			if (
				packet.topic.startsWith(`${PREFIX}/${vesselOf(user)}/`) &&
				!packet.topic.endsWith('/command')
			) {
				return done(null);
			}
			violations.push(`${user} published ${packet.topic}`);
			done(new Error('not your vessel'));
		},
		authorizeSubscribe: (client, sub, done) => {
			const user = (client as unknown as { user?: string }).user;
			if (
				user === OBSERVER.username ||
				sub.topic === `${PREFIX}/${vesselOf(user)}/separator/command`
			) {
				return done(null, sub);
			}
			violations.push(`${user} subscribed ${sub.topic}`);
			done(new Error('not your command topic'));
		}
	});
	const server = net.createServer(broker.handle);
	const listenPort = port ?? (await freePort());
	await new Promise<void>((resolve) => server.listen(listenPort, '127.0.0.1', resolve));
	return {
		port: listenPort,
		url: `mqtt://127.0.0.1:${listenPort}`,
		violations,
		close: async () => {
			// Broker first: it closes its clients, so the server can close.
			await new Promise<void>((resolve) => broker.close(() => resolve()));
			await new Promise<void>((resolve) => server.close(() => resolve()));
		}
	};
}

async function startObserver(url: string): Promise<{ client: MqttClient; received: Received[] }> {
	const received: Received[] = [];
	const client = await mqtt.connectAsync(url, { ...OBSERVER, reconnectPeriod: 0 });
	client.on('message', (topic, payload, packet) => {
		// The observer also hears the commands it sends, malformed ones included.
		if (topic.endsWith('/command')) return;
		received.push({
			topic,
			body: JSON.parse(payload.toString()),
			retain: packet.retain,
			at: Date.now()
		});
	});
	await client.subscribeAsync(`${PREFIX}/#`, { qos: 1 });
	return { client, received };
}

const brokers: TestBroker[] = [];
const clients: MqttClient[] = [];
const simulators: Simulator[] = [];
let logLines: string[] = [];

async function setup(options: SimulatorOptions = {}) {
	const broker = await startBroker();
	brokers.push(broker);
	const observer = await startObserver(broker.url);
	clients.push(observer.client);
	logLines = [];
	const sim = await startSimulator({
		url: broker.url,
		rateHz: 10,
		seed: 7,
		log: (line) => logLines.push(line),
		...options
	});
	simulators.push(sim);
	return { broker, sim, observer, received: observer.received };
}

afterEach(async () => {
	for (const sim of simulators.splice(0)) await sim.stop();
	for (const client of clients.splice(0)) await client.endAsync(true);
	for (const broker of brokers.splice(0)) await broker.close();
});

const topicOf = (vessel: string, ...rest: string[]) => [PREFIX, vessel, ...rest].join('/');
const on = (received: Received[], topic: string) => received.filter((m) => m.topic === topic);

describe('gateway simulator over MQTT', () => {
	it('publishes telemetry for every demo shaft and separator state for every vessel, in the contract shape', async () => {
		const { broker, received } = await setup({ rateHz: 20 });
		const started = Date.now();
		const shafts = DEMO_VESSELS.flatMap((v) =>
			v.shafts.map((s) => topicOf(v.code, s.code, 'telemetry'))
		);
		expect(shafts).toHaveLength(7);
		await waitFor(() => shafts.every((t) => on(received, t).length >= 5), {
			what: 'telemetry from every shaft'
		});

		for (const topic of shafts) {
			for (const { body, retain } of on(received, topic)) {
				expect(Object.keys(body).sort()).toEqual([
					'flow_lpm',
					'shaft_rpm',
					'supply_bar',
					'temp_c',
					'ts'
				]);
				expect(Number.isInteger(body.ts)).toBe(true);
				expect(body.ts as number).toBeGreaterThanOrEqual(started - 1_000);
				expect(body.ts as number).toBeLessThanOrEqual(Date.now());
				for (const key of ['flow_lpm', 'supply_bar', 'temp_c', 'shaft_rpm']) {
					expect(Number.isFinite(body[key]), `${topic} ${key}`).toBe(true);
				}
				expect(body.flow_lpm as number).toBeGreaterThan(0);
				expect(retain).toBe(false);
			}
		}
		await waitFor(() =>
			DEMO_VESSELS.every((v) => on(received, topicOf(v.code, 'separator', 'state')).length >= 1)
		);
		for (const v of DEMO_VESSELS) {
			for (const { body } of on(received, topicOf(v.code, 'separator', 'state'))) {
				expect(Object.keys(body).sort()).toEqual(['dp_bar', 'purge_valve', 'ts']);
				expect(Number.isInteger(body.ts)).toBe(true);
				expect(body.dp_bar as number).toBeGreaterThan(0);
				expect(['open', 'closed']).toContain(body.purge_valve);
			}
		}
		expect(broker.violations).toEqual([]);
	});

	it('keeps a retained online status for every gateway', async () => {
		const { broker } = await setup();
		const late = await startObserver(broker.url); // subscribes after the gateways came online
		clients.push(late.client);
		await waitFor(
			() => late.received.filter((m) => m.topic.endsWith('/gateway/status')).length === 4
		);
		for (const v of DEMO_VESSELS) {
			const [status] = on(late.received, topicOf(v.code, 'gateway', 'status'));
			expect(status).toMatchObject({ retain: true, body: { online: true } });
		}
	});

	it('opens the purge valve on command within 1 s and closes it after about duration_s', async () => {
		const { sim, observer, received } = await setup();
		const state = topicOf('corrin-bay', 'separator', 'state');
		await waitFor(() => on(received, state).length >= 1);
		const sent = Date.now();
		await observer.client.publishAsync(
			topicOf('corrin-bay', 'separator', 'command'),
			JSON.stringify({ id: 'test-1', action: 'purge', duration_s: 2 }),
			{ qos: 1 }
		);
		const opened = await waitFor(
			() => on(received, state).find((m) => m.at >= sent && m.body.purge_valve === 'open'),
			{
				timeoutMs: 1_000,
				what: 'valve open'
			}
		);
		const closed = await waitFor(
			() => on(received, state).find((m) => m.at > opened.at && m.body.purge_valve === 'closed'),
			{ timeoutMs: 5_000, what: 'valve closed' }
		);
		const openS = ((closed.body.ts as number) - (opened.body.ts as number)) / 1000;
		expect(openS).toBeGreaterThanOrEqual(1.9);
		expect(openS).toBeLessThan(2.6);
		// Only the commanded vessel purged.
		expect(
			on(received, topicOf('hallow-tern', 'separator', 'state')).some(
				(m) => m.body.purge_valve === 'open'
			)
		).toBe(false);
		expect(sim.stats()).toMatchObject({ commandsReceived: 1, purgesOpened: 1, commandsIgnored: 0 });
	});

	it('ignores a malformed command with one log line and keeps running', async () => {
		const { sim, observer, received } = await setup();
		await observer.client.publishAsync(
			topicOf('corrin-bay', 'separator', 'command'),
			'{"action":',
			{ qos: 1 }
		);
		await observer.client.publishAsync(
			topicOf('corrin-bay', 'separator', 'command'),
			JSON.stringify({ id: 'x', action: 'purge', duration_s: 'long' }),
			{ qos: 1 }
		);
		await waitFor(() => sim.stats().commandsIgnored === 2, { what: 'two ignored commands' });
		expect(logLines.filter((l) => l.includes('malformed command'))).toHaveLength(2);
		const count = on(received, topicOf('corrin-bay', 'port', 'telemetry')).length;
		await waitFor(
			() => on(received, topicOf('corrin-bay', 'port', 'telemetry')).length > count + 5
		);
		expect(sim.stats().purgesOpened).toBe(0);
	});

	it('with stuck-valve the valve does not open on command', async () => {
		const { sim, observer, received } = await setup();
		sim.setFault('corrin-bay', 'stuck-valve', true);
		const state = topicOf('corrin-bay', 'separator', 'state');
		const sent = Date.now();
		await observer.client.publishAsync(
			topicOf('corrin-bay', 'separator', 'command'),
			JSON.stringify({ id: 'test-2', action: 'purge', duration_s: 5 }),
			{ qos: 1 }
		);
		await waitFor(() => sim.stats().commandsReceived === 1);
		// Two periodic states (1 s apart) after the command: both still closed.
		await waitFor(() => on(received, state).filter((m) => m.at > sent).length >= 2, {
			what: 'two states'
		});
		expect(on(received, state).every((m) => m.body.purge_valve === 'closed')).toBe(true);
		expect(sim.stats().commands.at(-1)).toMatchObject({
			vessel: 'corrin-bay',
			id: 'test-2',
			result: 'ignored'
		});
	});

	it('offline: the broker publishes the will, then the gateway replays its backlog with the original ts, in order', async () => {
		const { sim, received } = await setup({ offlineS: 2 });
		const status = topicOf('corrin-bay', 'gateway', 'status');
		const port = topicOf('corrin-bay', 'port', 'telemetry');
		await waitFor(() => on(received, port).length >= 5);
		sim.setFault('corrin-bay', 'offline', true);
		const will = await waitFor(() => on(received, status).find((m) => m.body.online === false), {
			what: 'will'
		});
		expect(sim.activeFaults()).toContainEqual({ fault: 'offline', vessel: 'corrin-bay' });
		const back = await waitFor(
			() => on(received, status).find((m) => m.at >= will.at && m.body.online === true),
			{
				what: 'online again'
			}
		);
		await waitFor(() =>
			on(received, port).some((m) => m.at > back.at && (m.body.ts as number) > back.at)
		);

		const sampledWhileDown = on(received, port).filter(
			(m) => (m.body.ts as number) > will.at && (m.body.ts as number) < back.at - 200
		);
		// 10 Hz for about 2 s; all of them arrived only after the link came back.
		expect(sampledWhileDown.length).toBeGreaterThanOrEqual(12);
		expect(sampledWhileDown.every((m) => m.at >= back.at)).toBe(true);
		// The whole stream, as received, is in sampling order with no gap like the outage's
		// (about 2 s). QoS 1 is at-least-once: a sample in flight when the link dropped may
		// come twice, so repeats of a ts already seen are set aside first.
		const seen = new Set<number>();
		const ts: number[] = [];
		for (const m of on(received, port)) {
			const t = m.body.ts as number;
			if (seen.has(t)) expect(t).toBeLessThanOrEqual(will.at);
			else ts.push(t);
			seen.add(t);
		}
		for (let i = 1; i < ts.length; i++) {
			expect(ts[i]).toBeGreaterThan(ts[i - 1]);
			expect(ts[i] - ts[i - 1]).toBeLessThan(1_000);
		}
		expect(sim.stats().replayed).toBeGreaterThan(0);
		// Other gateways stayed online throughout.
		expect(
			on(received, topicOf('hallow-tern', 'gateway', 'status')).every((m) => m.body.online === true)
		).toBe(true);
	});

	it('stop() leaves every gateway status offline (retained)', async () => {
		const { broker, sim } = await setup();
		await sim.stop();
		const late = await startObserver(broker.url);
		clients.push(late.client);
		await waitFor(
			() => late.received.filter((m) => m.topic.endsWith('/gateway/status')).length === 4
		);
		for (const v of DEMO_VESSELS) {
			expect(on(late.received, topicOf(v.code, 'gateway', 'status'))).toMatchObject([
				{ retain: true, body: { online: false } }
			]);
		}
	});

	it('reconnects when the broker goes away and comes back, replaying what it sampled meanwhile', async () => {
		const { broker, sim } = await setup();
		await broker.close();
		brokers.splice(brokers.indexOf(broker), 1);
		const down = Date.now();
		await new Promise((r) => setTimeout(r, 1_000));
		const again = await startBroker(broker.port);
		brokers.push(again);
		const observer = await startObserver(again.url);
		clients.push(observer.client);
		const port = topicOf('corrin-bay', 'port', 'telemetry');
		await waitFor(
			() => on(observer.received, port).some((m) => (m.body.ts as number) < down + 1_000),
			{
				timeoutMs: 15_000,
				what: 'samples from the outage'
			}
		);
		expect(logLines.some((l) => l.startsWith('corrin-bay: reconnected'))).toBe(true);
		expect(sim.gateways().every((g) => g.connected)).toBe(true);
	});

	it('a gateway with wrong credentials does not stop the others', async () => {
		const { sim, received } = await setup({
			credentials: (code) => ({
				username: `gw-${code}`,
				password: code === 'lakeline-wren' ? 'wrong' : demoGatewayPassword(code, DEMO_PASSWORD)
			})
		});
		await waitFor(() => on(received, topicOf('corrin-bay', 'port', 'telemetry')).length >= 3);
		expect(on(received, topicOf('lakeline-wren', 'port', 'telemetry'))).toHaveLength(0);
		expect(sim.gateways().find((g) => g.vessel === 'lakeline-wren')?.connected).toBe(false);
		expect(logLines.filter((l) => l.startsWith('lakeline-wren: cannot connect'))).toHaveLength(1);
	});
});
