/**
 * Simulated gateways for bench:ingest: one MQTT.js connection per vessel,
 * publishing telemetry for its shafts. Runs outside the server's event loop,
 * as a child process (forked) or a worker thread; see publishers.ts.
 *
 * Flow control, so the figures are what the broker takes and not what the
 * kernel can buffer (loopback sockets autotune to megabytes each, which at
 * 100 connections would hide minutes of backlog from the lag figures):
 * - QoS 1: at most `window` PUBACKs awaited per connection.
 * - QoS 0: the socket's own back-pressure (16 KB writable buffer) and, with
 *   `credit`, a total the bench raises as the server receives (ingest.ts).
 */
import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import mqtt, { type MqttClient } from 'mqtt';
import {
	PUBLISHER_ROLE,
	sampleTs,
	telemetryBody,
	type ConnSpec,
	type FromPublisher,
	type InitMsg,
	type ToPublisher
} from './protocol';

/** messages one connection publishes per turn before yielding, so the others get theirs out too */
const CHUNK = 64;

interface Channel {
	send(msg: FromPublisher): void;
	onMessage(fn: (msg: ToPublisher) => void): void;
	exit(): void;
}

type Waiting = 'none' | 'window' | 'drain' | 'credit' | 'scheduled' | 'finished';

class Conn {
	client!: MqttClient;
	rr = 0;
	inflight = 0;
	remaining = 0;
	waiting: Waiting = 'none';
	constructor(readonly spec: ConnSpec) {}
}

class Growable {
	data = new Float64Array(1024);
	length = 0;
	push(v: number) {
		if (this.length === this.data.length) {
			const next = new Float64Array(this.data.length * 2);
			next.set(this.data);
			this.data = next;
		}
		this.data[this.length++] = v;
	}
}

function run(channel: Channel) {
	let init: InitMsg;
	let conns: Conn[] = [];
	let running = false;
	let allowed = Infinity;
	let sent = 0;
	let acked = 0;
	let errors = 0;
	const firstErrors: string[] = [];
	let startedAt = 0;
	let cpu0 = process.cpuUsage();
	const sentAt = new Map<number, Growable>();
	const nextK = new Map<number, number>();
	const creditWaiters: Conn[] = [];
	let finishTimer: NodeJS.Timeout | null = null;
	let reported = false;

	const error = (what: string) => {
		errors++;
		if (firstErrors.length < 5) firstErrors.push(what);
	};

	async function connectAll(msg: InitMsg) {
		init = msg;
		conns = msg.conns.map((spec) => new Conn(spec));
		for (const c of conns)
			for (const s of c.spec.shafts) {
				sentAt.set(s.g, new Growable());
				nextK.set(s.g, 0);
			}
		const failed: string[] = [];
		await Promise.all(
			conns.map(
				(c) =>
					new Promise<void>((resolve) => {
						const client = mqtt.connect(msg.url, {
							clientId: c.spec.clientId,
							username: c.spec.username,
							password: c.spec.password,
							reconnectPeriod: 0,
							connectTimeout: 60_000, // ms: the server checks 100 argon2 hashes at once
							keepalive: 60, // s
							// rescheduling the keepalive timer on every packet costs CPU the server needs
							reschedulePings: false,
							queueQoSZero: false
						});
						c.client = client;
						client.once('connect', () => resolve());
						client.once('error', (err) => {
							failed.push(`${c.spec.clientId}: ${err.message}`);
							resolve();
						});
						client.on('close', () => {
							if (running) error(`${c.spec.clientId}: connection closed while publishing`);
						});
					})
			)
		);
		channel.send({ type: 'ready', connected: conns.length - failed.length, failed });
	}

	function publishOne(c: Conn, now: number) {
		const shafts = c.spec.shafts;
		const s = shafts[c.rr];
		c.rr = c.rr + 1 === shafts.length ? 0 : c.rr + 1;
		const k = nextK.get(s.g)!;
		nextK.set(s.g, k + 1);
		sentAt.get(s.g)!.push(now);
		const body = telemetryBody(sampleTs(init.ts0, k), s.g, k);
		sent++;
		if (init.mode === 'burst') c.remaining--;
		if (init.qos === 1) {
			c.inflight++;
			c.client.publish(s.topic, body, { qos: 1 }, (err) => {
				c.inflight--;
				if (err) error(err.message);
				else acked++;
				if (c.waiting === 'window') schedule(c);
				else if (!running || c.waiting === 'finished') checkFinished();
			});
		} else {
			c.client.publish(s.topic, body, { qos: 0 });
		}
	}

	function schedule(c: Conn) {
		c.waiting = 'scheduled';
		setImmediate(turn, c);
	}

	function turn(c: Conn) {
		c.waiting = 'none';
		if (!running) return checkFinished();
		const now = Date.now();
		for (let n = 0; ; n++) {
			if (init.mode === 'burst' && c.remaining <= 0) {
				c.waiting = 'finished';
				return checkFinished();
			}
			if (init.qos === 1 && init.window > 0 && c.inflight >= init.window) {
				c.waiting = 'window';
				return;
			}
			if (sent >= allowed) {
				c.waiting = 'credit';
				creditWaiters.push(c);
				return;
			}
			if (init.qos === 0 && c.client.stream.writableNeedDrain) {
				c.waiting = 'drain';
				c.client.stream.once('drain', () => turn(c));
				return;
			}
			if (n === CHUNK) return schedule(c);
			publishOne(c, now);
		}
	}

	function go() {
		cpu0 = process.cpuUsage();
		startedAt = Date.now();
		running = true;
		for (const c of conns) {
			c.remaining = init.backlog;
			schedule(c);
		}
		if (init.mode === 'sustained') {
			setTimeout(() => {
				running = false;
				checkFinished();
			}, init.seconds * 1000);
		}
	}

	/** Finished when publishing has stopped and every message is written (QoS 0) or acknowledged (QoS 1). */
	function checkFinished() {
		if (reported) return;
		if (running && init.mode === 'sustained') return;
		if (running && conns.some((c) => c.waiting !== 'finished')) return;
		running = false;
		if (init.qos === 1 && conns.some((c) => c.inflight > 0 && c.client.connected)) return;
		if (init.qos === 0) {
			// written means handed to the kernel; poll, as the last 'drain' may never be needed
			if (conns.some((c) => c.client.connected && c.client.stream.writableLength > 0)) {
				finishTimer ??= setTimeout(() => {
					finishTimer = null;
					checkFinished();
				}, 2);
				return;
			}
		}
		reported = true;
		const finishedAt = Date.now();
		const cpu = process.cpuUsage(cpu0);
		const out: { g: number; times: Float64Array }[] = [];
		for (const [g, times] of sentAt) out.push({ g, times: times.data.slice(0, times.length) });
		channel.send({
			type: 'done',
			sent,
			acked,
			errors,
			firstErrors,
			startedAt,
			finishedAt,
			sentAt: out,
			cpuMs: (cpu.user + cpu.system) / 1000
		});
	}

	channel.onMessage((msg) => {
		switch (msg.type) {
			case 'init':
				if (msg.credit && msg.qos === 0) allowed = 0;
				void connectAll(msg);
				break;
			case 'go':
				go();
				break;
			case 'allow':
				allowed = msg.total;
				for (const c of creditWaiters.splice(0)) if (c.waiting === 'credit') schedule(c);
				break;
			case 'close':
				running = false;
				Promise.all(conns.map((c) => c.client?.endAsync(true).catch(() => {}))).then(() => {
					channel.send({ type: 'closed' });
					channel.exit();
				});
				break;
		}
	});
}

if (!isMainThread && workerData?.role === PUBLISHER_ROLE) {
	const port = parentPort!;
	run({
		send: (msg) => port.postMessage(msg),
		onMessage: (fn) => port.on('message', fn),
		exit: () => port.close()
	});
} else if (isMainThread && process.send && process.argv.includes(PUBLISHER_ROLE)) {
	run({
		send: (msg) => process.send!(msg),
		onMessage: (fn) => process.on('message', (m) => fn(m as ToPublisher)),
		exit: () => process.disconnect()
	});
}
