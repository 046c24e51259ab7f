/**
 * A gateway's ordered outbox. Messages go to the broker in the order they
 * were sampled, at most WINDOW unacknowledged at a time; while the link is
 * down they wait here (up to a bound) and go out oldest first when it is back.
 */
import type { MqttClient } from 'mqtt';

export interface Outgoing {
	topic: string;
	payload: string;
	/** queued while the link was down: counts as replayed once acknowledged */
	buffered: boolean;
}

/** Messages handed to MQTT.js and not yet acknowledged, at most (keeps order and memory bounded). */
const WINDOW = 64;

export class Outbox {
	private queue: Outgoing[] = [];
	private inflight = new Map<number, Outgoing>();
	private seq = 0;
	private client: MqttClient | null = null;
	private up = false;
	/** bumps when a link is dropped, so that link's late callbacks are ignored */
	private generation = 0;

	constructor(
		private readonly maxBacklog: number,
		private readonly onAck: (msg: Outgoing) => void,
		private readonly onDiscard: () => void
	) {}

	/** messages waiting or unacknowledged */
	get size(): number {
		return this.queue.length + this.inflight.size;
	}

	push(topic: string, body: object): void {
		this.queue.push({ topic, payload: JSON.stringify(body), buffered: !this.up });
		if (this.queue.length > this.maxBacklog) {
			this.queue.shift();
			this.onDiscard();
		}
	}

	/** The link is up (again): send what waits. */
	online(client: MqttClient): void {
		this.client = client;
		this.up = true;
		this.flush();
	}

	/**
	 * The link went down but the client will reconnect by itself: MQTT.js keeps
	 * and resends what it already has in flight, new messages wait here.
	 */
	pause(): void {
		this.up = false;
	}

	/** The link was thrown away: what it had not acknowledged goes again first, in order. */
	drop(): void {
		this.generation++;
		this.queue.unshift(...[...this.inflight.values()].map((m) => ({ ...m, buffered: true })));
		this.inflight.clear();
		this.client = null;
		this.up = false;
	}

	/** Hands queued messages to the client; `all` ignores the window (on stop). */
	flush(all = false): void {
		const client = this.client;
		while (this.up && client && this.queue.length > 0 && (all || this.inflight.size < WINDOW)) {
			this.send(client, this.queue.shift()!);
		}
	}

	private send(client: MqttClient, msg: Outgoing): void {
		const gen = this.generation;
		const id = ++this.seq;
		this.inflight.set(id, msg);
		client.publish(msg.topic, msg.payload, { qos: 1 }, (err) => {
			if (gen !== this.generation) return; // requeued by drop()
			this.inflight.delete(id);
			if (err) this.queue.unshift({ ...msg, buffered: true });
			else this.onAck(msg);
			this.flush();
		});
	}
}
