/**
 * One vessel's gateway: one MQTT connection with the vessel's own
 * credentials, sampling its model, publishing telemetry and separator state
 * at QoS 1, obeying purge commands, and keeping an ordered outbox so that
 * nothing sampled while the link is down is lost: it is replayed, oldest
 * first, with its original timestamps once the link is back.
 */
import mqtt, { type MqttClient } from 'mqtt';
import type { VesselModel } from './model';
import { parseCommand } from './command';
import { Outbox } from './outbox';
import type { SimulatorStats } from './stats';
import { recordCommand } from './stats';

export interface Credentials {
	username: string;
	password: string;
}

export interface GatewayOptions {
	url: string;
	prefix: string;
	model: VesselModel;
	credentials: Credentials;
	rateHz: number;
	separatorIntervalS: number;
	/** most messages held while the link is down; the oldest go first beyond it */
	maxBacklog: number;
	/** where in its sampling period this gateway starts, 0–1 (spreads a big fleet's load) */
	phase: number;
	stats: SimulatorStats;
	log: (line: string) => void;
}

const ONLINE = JSON.stringify({ online: true });
const OFFLINE = JSON.stringify({ online: false });
/** How long stop() waits for the broker to acknowledge the offline status, ms */
const STOP_WAIT_MS = 3_000;
/** Purge command ids remembered, so a QoS 1 redelivery does not purge twice */
const SEEN_IDS = 50;

export class Gateway {
	readonly code: string;
	connected = false;
	private client: MqttClient | null = null;
	/** bumps whenever a client is dropped, so its late events are ignored */
	private generation = 0;
	private readonly outbox: Outbox;
	private offlineTimer: NodeJS.Timeout | null = null;
	private tickTimer: NodeJS.Timeout | null = null;
	private lastTick = Date.now();
	private nextSample: number;
	private nextSeparator: number;
	private readonly sampleMs: number;
	private seenIds: string[] = [];
	private everConnected = false;
	private troubleLogged = false;
	private stopping = false;
	private firstAttempt: (() => void) | null = null;

	constructor(private readonly o: GatewayOptions) {
		this.code = o.model.spec.code;
		this.sampleMs = 1000 / o.rateHz;
		const now = Date.now();
		this.nextSample = now + o.phase * this.sampleMs;
		this.nextSeparator = now + o.phase * o.separatorIntervalS * 1000;
		this.outbox = new Outbox(
			o.maxBacklog,
			(msg) => this.count(msg.topic, msg.buffered),
			() => o.stats.dropped++
		);
	}

	get offline(): boolean {
		return this.offlineTimer !== null;
	}

	get backlog(): number {
		return this.outbox.size;
	}

	private topic(...parts: string[]): string {
		return [this.o.prefix, this.code, ...parts].join('/');
	}

	/** Starts sampling and connecting; resolves after the first attempt to connect succeeds or fails. */
	start(): Promise<void> {
		// Tick at least twice per sample (each sample gets its own millisecond) and
		// 4 times a second (a valve change goes out within 250 ms).
		const tickMs = Math.max(10, Math.min(250, this.sampleMs / 2));
		this.lastTick = Date.now();
		this.tickTimer = setInterval(() => this.tick(), tickMs);
		return new Promise((resolve) => {
			this.firstAttempt = resolve;
			this.connect();
		});
	}

	private connect(): void {
		const gen = ++this.generation;
		const { username, password } = this.o.credentials;
		const client = mqtt.connect(this.o.url, {
			username,
			password,
			clientId: `${username}-${Math.random().toString(36).slice(2, 10)}`,
			clean: true,
			keepalive: 30,
			reconnectPeriod: 2_000,
			connectTimeout: 10_000,
			// A refused sign-in (credentials not issued yet) is retried like a lost broker.
			reconnectOnConnackError: true,
			resubscribe: false,
			will: {
				topic: this.topic('gateway', 'status'),
				payload: Buffer.from(OFFLINE),
				qos: 1,
				retain: true
			}
		});
		this.client = client;
		const current = () => gen === this.generation && !this.stopping;
		client.on('connect', () => current() && this.onConnect(client));
		client.on('message', (_topic, payload) => current() && this.onCommand(payload));
		client.on('close', () => {
			if (!current()) return;
			if (this.connected) this.o.log(`${this.code}: link lost, buffering until the broker is back`);
			this.connected = false;
			this.outbox.pause();
			this.settleFirstAttempt();
		});
		client.on('error', (err) => {
			if (!current() || this.troubleLogged) return;
			this.troubleLogged = true;
			this.o.log(
				`${this.code}: cannot connect to ${this.o.url} as ${username}: ${err.message} (retrying)`
			);
			this.settleFirstAttempt();
		});
	}

	private settleFirstAttempt(): void {
		this.firstAttempt?.();
		this.firstAttempt = null;
	}

	private onConnect(client: MqttClient): void {
		this.connected = true;
		this.troubleLogged = false;
		const shafts = this.o.model.spec.shafts.length;
		this.o.log(
			this.everConnected
				? `${this.code}: reconnected, replaying ${this.outbox.size} buffered messages`
				: `${this.code}: connected as ${this.o.credentials.username} (${shafts} shaft${shafts === 1 ? '' : 's'})`
		);
		this.everConnected = true;
		const status = this.topic('gateway', 'status');
		// Straight onto the wire, ahead of any backlog: the server learns the gateway is back first.
		client.publish(status, ONLINE, { qos: 1, retain: true }, (err) => err || this.count(status));
		client.subscribe(this.topic('separator', 'command'), { qos: 1 }, (err) => {
			if (err) this.o.log(`${this.code}: cannot subscribe to its command topic: ${err.message}`);
		});
		this.settleFirstAttempt();
		this.outbox.online(client);
	}

	private count(topic: string, buffered = false): void {
		const s = this.o.stats;
		s.published[topic] = (s.published[topic] ?? 0) + 1;
		s.publishedTotal++;
		if (buffered) s.replayed++;
	}

	private tick(): void {
		const now = Date.now();
		const dtS = Math.min(5, Math.max(0, (now - this.lastTick) / 1000));
		this.lastTick = now;
		const model = this.o.model;
		const valveChanged = model.step(dtS) !== null;
		if (now >= this.nextSample) {
			for (const shaft of model.spec.shafts) {
				this.outbox.push(this.topic(shaft.code, 'telemetry'), {
					ts: now,
					...model.readShaft(shaft.code)
				});
			}
			this.nextSample += this.sampleMs;
			// After a stall, pick up the rhythm instead of firing a burst of late samples.
			if (this.nextSample <= now) this.nextSample = now + this.sampleMs;
		}
		if (valveChanged || now >= this.nextSeparator) {
			this.publishSeparator(now);
		}
		this.outbox.flush();
	}

	private publishSeparator(now: number): void {
		this.outbox.push(this.topic('separator', 'state'), {
			ts: now,
			...this.o.model.readSeparator()
		});
		this.nextSeparator = now + this.o.separatorIntervalS * 1000;
	}

	private onCommand(payload: Buffer): void {
		const stats = this.o.stats;
		stats.commandsReceived++;
		const parsed = parseCommand(payload);
		if (!parsed.ok) {
			stats.commandsIgnored++;
			recordCommand(stats, {
				vessel: this.code,
				id: null,
				result: 'malformed',
				reason: parsed.reason
			});
			this.o.log(`${this.code}: ignored a malformed command: ${parsed.reason}`);
			return;
		}
		const { id, duration_s } = parsed.command;
		if (this.seenIds.includes(id)) {
			recordCommand(stats, { vessel: this.code, id, result: 'duplicate' });
			return;
		}
		this.seenIds.push(id);
		if (this.seenIds.length > SEEN_IDS) this.seenIds.shift();
		const result = this.o.model.purge(duration_s);
		recordCommand(stats, { vessel: this.code, id, result });
		if (result === 'opened') {
			stats.purgesOpened++;
			this.publishSeparator(Date.now());
			this.outbox.flush();
		} else if (result === 'ignored') {
			this.o.log(`${this.code}: purge ${id} ignored: the purge valve is stuck (fault)`);
		}
	}

	/**
	 * Simulates a dropped link for `seconds`: the socket goes without a DISCONNECT,
	 * so the broker publishes the last will. Sampling goes on into the outbox.
	 */
	goOffline(seconds: number): void {
		if (this.stopping) return;
		if (this.offlineTimer) clearTimeout(this.offlineTimer);
		this.offlineTimer = setTimeout(() => this.comeBack(), seconds * 1000);
		if (!this.client) return; // already down: just extends the outage
		const dropped = this.client;
		this.client = null;
		this.connected = false;
		this.generation++;
		this.outbox.drop();
		dropped.end(true);
		this.o.log(`${this.code}: link dropped for ${seconds} s (simulated), buffering samples`);
	}

	/** Ends a simulated outage early (or on time): reconnects and replays the backlog. */
	comeBack(): void {
		if (!this.offlineTimer) return;
		clearTimeout(this.offlineTimer);
		this.offlineTimer = null;
		if (!this.stopping && !this.client) this.connect();
	}

	/** Stops sampling; hands over what is queued, publishes offline status, disconnects cleanly. */
	async stop(): Promise<void> {
		if (this.stopping) return;
		if (this.tickTimer) clearInterval(this.tickTimer);
		if (this.offlineTimer) clearTimeout(this.offlineTimer);
		this.offlineTimer = null;
		const client = this.client;
		const wasConnected = this.connected;
		this.outbox.flush(true);
		this.stopping = true;
		this.settleFirstAttempt();
		if (!client) return;
		let acked = false;
		if (wasConnected) {
			const status = this.topic('gateway', 'status');
			const publish = client.publishAsync(status, OFFLINE, { qos: 1, retain: true });
			acked = await Promise.race([
				publish.then(() => true).catch(() => false),
				delay(STOP_WAIT_MS).then(() => false)
			]);
			if (acked) this.count(status);
		}
		// A clean DISCONNECT discards the will (MQTT 3.1.1 §3.1.2.5): fine once the
		// offline status is retained; otherwise drop the link and let the will say it.
		const ended = await Promise.race([
			client.endAsync(!acked).then(
				() => true,
				() => true
			),
			delay(STOP_WAIT_MS).then(() => false)
		]);
		if (!ended) client.stream?.destroy();
		this.connected = false;
	}
}

const delay = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms).unref());
