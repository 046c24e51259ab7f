/**
 * The live fan-out: one subscriber to ingest and alarms, many SSE clients.
 * Samples are gathered per vessel and sent every FLUSH_MS as one message whose
 * bytes are encoded once for all of that vessel's clients — no client ever
 * causes a database read after its first snapshot. A ring of recent messages
 * per vessel lets a reconnecting client resume from its Last-Event-ID; after
 * a server restart (empty ring) the gap is filled from the database.
 */
import type { AppContext } from '../context';
import type { AlarmTransition } from '../alarms/store';
import { listAlarms } from '../alarms/queries';
import { HEARTBEAT, RETRY, sseMessage, SseClient } from './sse';
import { samplesSince, vesselSnapshot, type SampleTuple, type SeparatorTuple } from './snapshot';

/** ms: fast enough that publish → screen stays well under 100 ms at p95, yet batched */
const FLUSH_MS = 25;
const HEARTBEAT_MS = 15_000;
const FLEET_EVERY_MS = 1_000;
/** how long a vessel's recent messages are kept for resuming streams */
const RING_MS = 120_000;
const BACKFILL_MARGIN_MS = 5_000;
/** setTimeout's longest delay (about 24.8 days); a later expiry is checked then */
const MAX_TIMER_MS = 2 ** 31 - 1;

/** Who opened a stream and with what: so a change to either can end it. */
export interface StreamAccess {
	userId: string;
	/** `session:<id>` or `token:<id>` (see streamAccess) */
	credential: string;
	/** epoch ms the session expires, or null for an API token (valid until revoked) */
	expiresAt: number | null;
}

interface Channel {
	clients: Set<SseClient>;
	shafts: Map<number, SampleTuple[]>;
	separator: SeparatorTuple[];
	ring: { id: number; bytes: Uint8Array }[];
}

interface FleetClient {
	client: SseClient;
	vessels: number[] | 'all';
}

export class LiveHub {
	#channels = new Map<number, Channel>();
	#fleet = new Set<FleetClient>();
	#lastId = 0;
	#timers: NodeJS.Timeout[] = [];
	#unsubscribe: (() => void)[] = [];

	constructor(private readonly ctx: AppContext) {
		const pipeline = ctx.services.telemetry?.pipeline;
		if (pipeline) {
			this.#unsubscribe.push(
				pipeline.listen({
					sample: (e) => {
						const ch = this.#channels.get(e.shaft.vesselId);
						if (!ch || e.origin !== 'live') return;
						let list = ch.shafts.get(e.shaft.id);
						if (!list) ch.shafts.set(e.shaft.id, (list = []));
						list.push([e.ts, e.flow_lpm, e.supply_bar, e.temp_c, e.shaft_rpm]);
					},
					separator: (e) => void this.#channels.get(e.vesselId)?.separator.push([e.ts, e.dp_bar, e.purge_valve]),
					valve: (e) => this.#broadcast(e.vesselId, 'purge', e),
					gateway: (e) => this.#broadcast(e.vesselId, 'gateway', e)
				})
			);
		}
		this.#unsubscribe.push(ctx.events.on('alarm.changed', (change) => this.#onAlarm(change)));
		const every = (ms: number, fn: () => void) => {
			const t = setInterval(() => {
				try {
					fn();
				} catch (err) {
					console.error('[aftwater] live:', err);
				}
			}, ms);
			t.unref();
			this.#timers.push(t);
		};
		every(FLUSH_MS, () => this.#flush());
		every(HEARTBEAT_MS, () => this.#heartbeat());
		every(FLEET_EVERY_MS, () => this.#fleetTick());
	}

	/** strictly increasing message ids that are also times (ms), so a gap can be filled by time */
	#nextId() {
		this.#lastId = Math.max(this.#lastId + 1, Date.now());
		return this.#lastId;
	}

	#channel(vesselId: number): Channel {
		let ch = this.#channels.get(vesselId);
		if (!ch) {
			ch = { clients: new Set(), shafts: new Map(), separator: [], ring: [] };
			this.#channels.set(vesselId, ch);
		}
		return ch;
	}

	#publish(ch: Channel, event: string, data: unknown) {
		const id = this.#nextId();
		const bytes = sseMessage(event, data, String(id));
		ch.ring.push({ id, bytes });
		const cutoff = Date.now() - RING_MS;
		while (ch.ring.length && ch.ring[0].id < cutoff) ch.ring.shift();
		for (const c of ch.clients) c.send(bytes);
	}

	#broadcast(vesselId: number, event: string, data: unknown) {
		const ch = this.#channels.get(vesselId);
		if (ch) {
			this.#flushChannel(ch); // keep samples before the event they led to
			this.#publish(ch, event, data);
		}
	}

	#flushChannel(ch: Channel) {
		if (!ch.shafts.size && !ch.separator.length) return;
		const data = { shafts: Object.fromEntries(ch.shafts), separator: ch.separator };
		ch.shafts = new Map();
		ch.separator = [];
		this.#publish(ch, 'samples', data);
	}

	#flush() {
		for (const [vesselId, ch] of this.#channels) {
			this.#flushChannel(ch);
			// forget a vessel nobody has watched for a while
			if (!ch.clients.size && (!ch.ring.length || ch.ring[ch.ring.length - 1].id < Date.now() - RING_MS)) {
				this.#channels.delete(vesselId);
			}
		}
	}

	#onAlarm(change: AlarmTransition) {
		this.#broadcast(change.alarm.vessel_id, 'alarm', change);
		const bytes = sseMessage('alarm', change);
		for (const f of this.#fleet) {
			if (f.vessels === 'all' || f.vessels.includes(change.alarm.vessel_id)) f.client.send(bytes);
		}
	}

	#heartbeat() {
		for (const ch of this.#channels.values()) for (const c of ch.clients) c.send(HEARTBEAT);
		for (const f of this.#fleet) f.client.send(HEARTBEAT);
	}

	/** the fleet overview's figures, once a second */
	#fleetTick() {
		if (!this.#fleet.size) return;
		const pipeline = this.ctx.services.telemetry?.pipeline;
		if (!pipeline) return;
		const summary = new Map<number, unknown>();
		for (const vessel of pipeline.registry.vessels()) {
			const shafts: Record<number, unknown> = {};
			for (const s of vessel.shafts.values()) {
				const e = pipeline.latestSample.get(s.id);
				if (e) shafts[s.id] = { ts: e.ts, flow_lpm: e.flow_lpm, supply_bar: e.supply_bar, temp_c: e.temp_c, shaft_rpm: e.shaft_rpm };
			}
			summary.set(vessel.id, {
				gateway: pipeline.gateway.get(vessel.id) ?? null,
				separator: pipeline.latestSeparator.get(vessel.id) ?? null,
				shafts
			});
		}
		const cache = new Map<string, Uint8Array>();
		for (const f of this.#fleet) {
			const key = f.vessels === 'all' ? 'all' : f.vessels.join(',');
			let bytes = cache.get(key);
			if (!bytes) {
				const ids = f.vessels === 'all' ? [...summary.keys()] : f.vessels;
				bytes = sseMessage('fleet', { now: Date.now(), vessels: Object.fromEntries(ids.filter((id) => summary.has(id)).map((id) => [id, summary.get(id)])) });
				cache.set(key, bytes);
			}
			f.client.send(bytes);
		}
	}

	/** open streams by the user and by the credential (session or API token) they were opened with */
	#byUser = new Map<string, Set<SseClient>>();
	#byCredential = new Map<string, Set<SseClient>>();

	#own(access: StreamAccess, client: SseClient, onClose: () => void) {
		const index = (map: Map<string, Set<SseClient>>, key: string) => {
			let set = map.get(key);
			if (!set) map.set(key, (set = new Set()));
			set.add(client);
			return () => {
				set.delete(client);
				if (!set.size && map.get(key) === set) map.delete(key);
			};
		};
		const unindex = [index(this.#byUser, access.userId), index(this.#byCredential, access.credential)];
		// a stream may not outlive its session: it ends when the session would have expired, and the
		// reconnection is checked afresh (a session renewed meanwhile by other requests passes)
		const expiry =
			access.expiresAt === null
				? null
				: setTimeout(() => client.close(), Math.min(Math.max(access.expiresAt - Date.now(), 0), MAX_TIMER_MS));
		expiry?.unref();
		client.onClose = () => {
			if (expiry) clearTimeout(expiry);
			onClose();
			for (const u of unindex) u();
		};
	}

	/**
	 * Ends every stream of a user whose access changed (disabled, role, vessels, password): the
	 * browser reconnects by itself, and the reconnection is checked afresh (401 or 404 if it may
	 * no longer see it), so nobody keeps receiving what they may no longer see.
	 */
	closeUser(userId: string): void {
		// a copy: each close removes its client from the set
		for (const c of [...(this.#byUser.get(userId) ?? [])]) c.close();
	}

	/** Ends the streams opened with one credential: a session signed out, an API token revoked. */
	closeCredential(credential: string): void {
		for (const c of [...(this.#byCredential.get(credential) ?? [])]) c.close();
	}

	/** A client of one vessel: snapshot (or resume), then live messages. */
	async openVessel(access: StreamAccess, vesselId: number, windowMs: number, lastEventId: number | null): Promise<SseClient> {
		const client = new SseClient();
		const ch = this.#channel(vesselId);
		client.send(RETRY);
		const resumable = lastEventId !== null && ch.ring.length > 0 && ch.ring[0].id <= lastEventId;
		if (resumable) {
			for (const m of ch.ring) if (m.id > lastEventId) client.send(m.bytes);
		} else if (lastEventId !== null) {
			// the ring does not reach back (e.g. the server restarted): fill the gap from the database
			const from = Math.max(lastEventId - BACKFILL_MARGIN_MS, Date.now() - windowMs);
			const gap = await samplesSince(this.ctx, vesselId, from);
			const snap = await vesselSnapshot(this.ctx, vesselId, 0);
			client.send(sseMessage('backfill', { ...gap, alarms: snap.alarms, gateway: snap.gateway }, String(this.#nextId())));
		} else {
			client.send(sseMessage('snapshot', await vesselSnapshot(this.ctx, vesselId, windowMs), String(this.#nextId())));
		}
		this.#flushChannel(ch); // what arrived during the queries goes out now, in order
		ch.clients.add(client);
		this.#own(access, client, () => ch.clients.delete(client));
		return client;
	}

	/** A client of the fleet overview: the active alarms, then a summary every second. */
	async openFleet(access: StreamAccess, vessels: number[] | 'all'): Promise<SseClient> {
		const client = new SseClient();
		client.send(RETRY);
		const alarms = await listAlarms(this.ctx.db, { vesselIds: vessels, state: 'active' });
		client.send(sseMessage('snapshot', { alarms }));
		const entry: FleetClient = { client, vessels };
		this.#fleet.add(entry);
		this.#own(access, client, () => this.#fleet.delete(entry));
		return client;
	}

	clientCount() {
		let n = this.#fleet.size;
		for (const ch of this.#channels.values()) n += ch.clients.size;
		return n;
	}

	stop() {
		for (const t of this.#timers) clearInterval(t);
		for (const u of this.#unsubscribe) u();
		for (const ch of this.#channels.values()) for (const c of ch.clients) c.close();
		for (const f of this.#fleet) f.client.close();
	}
}
