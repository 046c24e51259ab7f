/**
 * The ingest pipeline: every message from either source (the embedded
 * broker's in-process subscription or an MQTT.js client of an external
 * broker) comes through handle(). It is validated, counted, handed to the
 * writer thread in batches, and announced to listeners (rules, live view)
 * synchronously — so nothing after the source differs between the two.
 * A bad message is rejected with a reason and never throws out of here.
 */
import type { Config } from '../config';
import { SAMPLE_STRIDE, STATE_STRIDE, type GatewayStatusRow, type RejectedRow, type ValveChange, type WriteBatch, type WriteResult } from './batch';
import {
	fastTelemetry,
	gatewayStatusPayload,
	parseTopic,
	separatorStatePayload,
	telemetryPayload
} from './payloads';
import type { Registry, ShaftEntry } from './registry';
import { RowBuffer } from './row-buffer';
import { IngestStats } from './stats';
import type { WriterClient } from './writer-client';

export interface SampleEvent {
	shaft: ShaftEntry;
	ts: number;
	flow_lpm: number;
	supply_bar: number | null;
	temp_c: number | null;
	shaft_rpm: number | null;
	/** true when no newer sample of this shaft has been seen (not a replay of the past) */
	newest: boolean;
	/** 'import' for rows of an uploaded logger file: stored and rolled up, never judged as live */
	origin: MessageOrigin;
	/**
	 * true on the sample at which the gateway's clock was found to have gone back: from it on,
	 * this shaft's samples are judged by their new timestamps (judges re-anchor their timers)
	 */
	clockStepped: boolean;
}

/** A gateway clock that went back, as the admin page lists it. */
export interface ClockStep {
	vessel: string;
	shaft: string;
	/** server time it was recognised */
	at: number;
	/** the newest timestamp before, and the first of the new sequence */
	from_ts: number;
	to_ts: number;
}

export type MessageOrigin = 'live' | 'import';

export interface SeparatorEvent {
	vesselId: number;
	ts: number;
	dp_bar: number | null;
	purge_valve: 'open' | 'closed' | null;
	newest: boolean;
}

export interface ValveEvent {
	vesselId: number;
	ts: number;
	state: 'open' | 'closed';
	dp_bar: number | null;
}

export interface GatewayEvent {
	vesselId: number;
	online: boolean;
	at: number;
}

export interface RejectEvent {
	topic: string;
	reason: string;
	detail: string | null;
	at: number;
}

export interface IngestListener {
	sample?(e: SampleEvent): void;
	separator?(e: SeparatorEvent): void;
	valve?(e: ValveEvent): void;
	gateway?(e: GatewayEvent): void;
	rejected?(e: RejectEvent): void;
}

export interface SeparatorLatest {
	ts: number;
	dp_bar: number | null;
	dp_ts: number | null;
	purge_valve: 'open' | 'closed' | null;
}

/**
 * A gateway whose clock went back (an RTC reset, a correction of a clock that ran fast) sends
 * samples older than the newest stored, as a replay does; but a replay arrives in a burst, far
 * faster than its timestamps advance, and a clock that went back keeps pace with the server's.
 * After this many samples, spanning at least CLOCK_STEP_SPAN_MS of arrival, whose arrival minus
 * timestamp stays within CLOCK_STEP_JITTER_MS, the new timestamps are taken as the gateway's
 * present, so its samples are judged again. (Thresholds: common practice for 1 Hz telemetry.)
 */
const CLOCK_STEP_RUN = 5;
const CLOCK_STEP_SPAN_MS = 10_000;
const CLOCK_STEP_JITTER_MS = 500;
const CLOCK_STEPS_KEPT = 50;

interface BackwardRun {
	first_at: number;
	last_ts: number;
	offset: number;
	count: number;
}

/** Rejected messages kept per batch; past that a flood is only counted. */
const MAX_REJECTED_PER_BATCH = 200;
const PAYLOAD_EXCERPT_BYTES = 1024;

class Rejection {
	constructor(
		readonly reason: string,
		readonly detail: string | null = null
	) {}
}

export class IngestPipeline {
	readonly stats = new IngestStats();
	readonly latestSample = new Map<number, SampleEvent>();
	readonly latestSeparator = new Map<number, SeparatorLatest>();
	readonly gateway = new Map<number, { online: boolean; at: number; last_message_at: number | null }>();
	/** the latest gateway clocks found to have gone back, newest first */
	readonly clockSteps: ClockStep[] = [];
	#backward = new Map<number, BackwardRun>();
	#listeners: IngestListener[] = [];
	#samples = new RowBuffer(SAMPLE_STRIDE);
	#states = new RowBuffer(STATE_STRIDE, 256);
	#valves: ValveChange[] = [];
	#statuses: GatewayStatusRow[] = [];
	#rejected: RejectedRow[] = [];
	#lastMessageAt = new Map<number, number>();
	#oldestPending = 0;
	#seq = 0;
	/** per batch: when its oldest message arrived, for the commit lag */
	#batchOldest = new Map<number, number>();
	#timer: NodeJS.Timeout;
	/** told of every committed batch, with its rows (bench:ingest measures publish → commit lag with it) */
	onCommitted: ((result: WriteResult, batch: WriteBatch) => void) | null = null;

	constructor(
		private readonly config: Config,
		readonly registry: Registry,
		private readonly writer: WriterClient
	) {
		this.#timer = setInterval(() => {
			if (!this.writer.busy) this.flush();
		}, config.INGEST_FLUSH_MS);
		this.#timer.unref();
		writer.onCommitted = (result, batch) => {
			const oldest = this.#batchOldest.get(batch.seq) ?? Date.now();
			this.#batchOldest.delete(batch.seq);
			// every message that was not rejected ends stored (samples, separator states, statuses) or as a duplicate
			this.stats.committed(result.stored + result.states + batch.statuses.length, result.duplicates + result.stateDuplicates, Date.now() - oldest);
			this.onCommitted?.(result, batch);
			// Under load the next batch has been filling while this one was written: send it now if
			// it is worth a transaction or has waited a flush interval, else the timer sends it. Every
			// batch costs ~1 000 rollup upserts, so batches of a few thousand rows cost the writer
			// 1.2–2 × the CPU per row of full ones (bench:ingest), CPU a 2-core machine takes from the broker.
			const waited = this.#oldestPending > 0 && Date.now() - this.#oldestPending >= config.INGEST_FLUSH_MS;
			if (this.#pendingCount() >= config.INGEST_BATCH_SIZE / 2 || waited) this.flush();
		};
	}

	listen(listener: IngestListener): () => void {
		this.#listeners.push(listener);
		return () => {
			this.#listeners = this.#listeners.filter((l) => l !== listener);
		};
	}

	#emit<K extends keyof IngestListener>(kind: K, event: Parameters<NonNullable<IngestListener[K]>>[0]) {
		for (const l of this.#listeners) {
			const fn = l[kind] as ((e: typeof event) => void) | undefined;
			if (!fn) continue;
			try {
				fn.call(l, event);
			} catch (err) {
				console.error(`[aftwater] ingest listener (${kind}) failed:`, err);
			}
		}
	}

	#pendingCount() {
		return this.#samples.rows + this.#states.rows + this.#valves.length + this.#statuses.length + this.#rejected.length;
	}

	/** One MQTT message. Never throws. */
	handle(topic: string, payload: Buffer | Uint8Array, now = Date.now(), origin: MessageOrigin = 'live'): void {
		this.stats.received(now);
		try {
			this.#handle(topic, payload, now, origin);
		} catch (err) {
			const rejection = err instanceof Rejection ? err : new Rejection('internal_error', String(err));
			this.#reject(topic, payload, rejection, now);
		}
		if (this.#samples.rows >= this.config.INGEST_BATCH_SIZE) this.flush();
	}

	#handle(topic: string, payload: Buffer | Uint8Array, now: number, origin: MessageOrigin) {
		if (payload.length > this.config.MAX_PAYLOAD_BYTES) {
			throw new Rejection('payload_too_large', `${payload.length} bytes; the limit is ${this.config.MAX_PAYLOAD_BYTES}`);
		}
		const parsed = parseTopic(this.config.MQTT_TOPIC_PREFIX, topic);
		if (!parsed) throw new Rejection('unknown_topic');
		if (parsed.kind === 'separator_command') return; // the server's own commands, not telemetry
		const vessel = this.registry.vessel(parsed.vessel);
		if (!vessel) throw new Rejection('unknown_vessel', parsed.vessel);

		let body: unknown;
		try {
			// a view, not a copy, of what the broker handed over
			const bytes = Buffer.isBuffer(payload) ? payload : Buffer.from(payload.buffer, payload.byteOffset, payload.byteLength);
			body = JSON.parse(bytes.toString('utf8'));
		} catch {
			throw new Rejection('malformed_json');
		}
		if (body === null || typeof body !== 'object' || Array.isArray(body)) throw new Rejection('not_an_object');

		if (parsed.kind === 'telemetry') {
			const shaft = vessel.shafts.get(parsed.shaft!);
			if (!shaft) throw new Rejection('unknown_shaft', `${parsed.vessel}/${parsed.shaft}`);
			const p = fastTelemetry(body as Record<string, unknown>) ?? validate(telemetryPayload, body);
			this.#checkFuture(p.ts, now);
			const previous = this.latestSample.get(shaft.id);
			let newest = origin === 'live' && (!previous || p.ts > previous.ts);
			let clockStepped = false;
			if (newest) {
				if (this.#backward.size) this.#backward.delete(shaft.id);
			} else if (origin === 'live' && previous) {
				clockStepped = newest = this.#clockWentBack(vessel.code, shaft, previous.ts, p.ts, now);
			}
			const event: SampleEvent = {
				shaft,
				ts: p.ts,
				flow_lpm: p.flow_lpm,
				supply_bar: p.supply_bar ?? null,
				temp_c: p.temp_c ?? null,
				shaft_rpm: p.shaft_rpm ?? null,
				newest,
				origin,
				clockStepped
			};
			this.#samples.push(shaft.id, p.ts, p.flow_lpm, p.supply_bar ?? NaN, p.temp_c ?? NaN, p.shaft_rpm ?? NaN);
			if (origin === 'live') this.#touch(vessel.id, now);
			if (event.newest) this.latestSample.set(shaft.id, event);
			this.#emit('sample', event);
		} else if (parsed.kind === 'separator_state') {
			const p = validate(separatorStatePayload, body);
			this.#checkFuture(p.ts, now);
			const latest = this.latestSeparator.get(vessel.id);
			const newest = !latest || p.ts > latest.ts;
			const valve = p.purge_valve ?? null;
			this.#states.push(vessel.id, p.ts, p.dp_bar ?? NaN, valve === null ? -1 : valve === 'open' ? 1 : 0);
			this.#touch(vessel.id, now);
			if (newest) {
				const previousValve = latest?.purge_valve ?? null;
				const next: SeparatorLatest = {
					ts: p.ts,
					dp_bar: p.dp_bar ?? latest?.dp_bar ?? null,
					dp_ts: p.dp_bar != null ? p.ts : (latest?.dp_ts ?? null),
					purge_valve: valve ?? previousValve
				};
				this.latestSeparator.set(vessel.id, next);
				if (valve && valve !== previousValve && !(previousValve === null && valve === 'closed')) {
					const change: ValveChange = { vessel_id: vessel.id, ts: p.ts, state: valve, dp_bar: latest?.dp_bar ?? null };
					this.#valves.push(change);
					this.#emit('valve', { vesselId: vessel.id, ts: p.ts, state: valve, dp_bar: change.dp_bar });
				}
			}
			this.#emit('separator', { vesselId: vessel.id, ts: p.ts, dp_bar: p.dp_bar ?? null, purge_valve: valve, newest });
		} else {
			const p = validate(gatewayStatusPayload, body);
			if (p.ts !== undefined) this.#checkFuture(p.ts, now);
			const at = p.ts ?? now;
			const before = this.gateway.get(vessel.id);
			this.gateway.set(vessel.id, { online: p.online, at, last_message_at: before?.last_message_at ?? null });
			this.#statuses.push({ vessel_id: vessel.id, online: p.online, at });
			this.#emit('gateway', { vesselId: vessel.id, online: p.online, at });
		}
	}

	/** Whether this older-than-newest live sample completes a run that keeps pace with real time. */
	#clockWentBack(vesselCode: string, shaft: ShaftEntry, newestTs: number, ts: number, now: number): boolean {
		const offset = now - ts;
		const run = this.#backward.get(shaft.id);
		if (run && ts > run.last_ts && Math.abs(offset - run.offset) <= CLOCK_STEP_JITTER_MS) {
			run.count++;
			run.last_ts = ts;
			run.offset = offset;
		} else {
			this.#backward.set(shaft.id, { first_at: now, last_ts: ts, offset, count: 1 });
			return false;
		}
		if (run.count < CLOCK_STEP_RUN || now - run.first_at < CLOCK_STEP_SPAN_MS) return false;
		this.#backward.delete(shaft.id);
		this.clockSteps.unshift({ vessel: vesselCode, shaft: shaft.code, at: now, from_ts: newestTs, to_ts: ts });
		this.clockSteps.length = Math.min(this.clockSteps.length, CLOCK_STEPS_KEPT);
		this.stats.clock_steps_total++;
		console.warn(
			`[aftwater] ingest: the gateway clock of ${vesselCode}/${shaft.code} went back ` +
				`from ${new Date(newestTs).toISOString()} to ${new Date(ts).toISOString()}; its samples are judged from the new time on`
		);
		return true;
	}

	#checkFuture(ts: number, now: number) {
		if (ts > now + this.config.MAX_FUTURE_SKEW_S * 1000) {
			throw new Rejection('ts_in_future', `${new Date(ts).toISOString()} is more than ${this.config.MAX_FUTURE_SKEW_S} s ahead`);
		}
	}

	#touch(vesselId: number, now: number) {
		if (this.#oldestPending === 0) this.#oldestPending = now;
		this.#lastMessageAt.set(vesselId, now);
		const g = this.gateway.get(vesselId);
		if (g) g.last_message_at = now;
		else this.gateway.set(vesselId, { online: true, at: now, last_message_at: now });
	}

	#reject(topic: string, payload: Buffer | Uint8Array, r: Rejection, now: number) {
		this.stats.rejected(r.reason);
		if (this.#rejected.length < MAX_REJECTED_PER_BATCH) {
			if (this.#oldestPending === 0) this.#oldestPending = now;
			this.#rejected.push({
				at: now,
				topic: topic.slice(0, 300),
				reason: r.reason,
				detail: r.detail?.slice(0, 500) ?? null,
				payload: Buffer.from(payload.subarray(0, PAYLOAD_EXCERPT_BYTES)).toString('utf8')
			});
		}
		this.#emit('rejected', { topic, reason: r.reason, detail: r.detail, at: now });
	}

	/** Hands what has accumulated to the writer thread. */
	flush() {
		if (this.#pendingCount() === 0) return;
		const batch: WriteBatch = {
			seq: ++this.#seq,
			samples: this.#samples.take(),
			states: this.#states.take(),
			valves: this.#valves.splice(0),
			statuses: this.#statuses.splice(0),
			rejected: this.#rejected.splice(0),
			lastMessageAt: [...this.#lastMessageAt]
		};
		this.#lastMessageAt.clear();
		this.#batchOldest.set(batch.seq, this.#oldestPending || Date.now());
		this.#oldestPending = 0;
		this.writer.submit(batch);
	}

	/** Flushes and waits until everything received so far is committed. */
	async drain() {
		this.flush();
		await this.writer.idle();
	}

	stop() {
		clearInterval(this.#timer);
	}
}

function validate<T>(schema: { safeParse(v: unknown): { success: true; data: T } | { success: false; error: { issues: { path: PropertyKey[]; message: string }[] } } }, body: unknown): T {
	const result = schema.safeParse(body);
	if (result.success) return result.data;
	const issue = result.error.issues[0];
	const field = issue.path.map(String).join('.') || 'payload';
	const reason = field === 'flow_lpm' && /negative/.test(issue.message) ? 'negative_flow' : field === 'ts' ? 'invalid_ts' : 'invalid_field';
	throw new Rejection(reason, `${field}: ${issue.message}`);
}
