/**
 * What the bench (the server's process) and its publisher processes or
 * threads say to each other, and the telemetry messages they publish.
 */

export interface ShaftSpec {
	/** index of the shaft in the whole bench fleet (0 … shafts − 1) */
	g: number;
	topic: string;
}

export interface ConnSpec {
	clientId: string;
	username: string;
	password: string;
	shafts: ShaftSpec[];
}

export type PublishMode =
	/** publish as fast as the broker takes them for `seconds` */
	| 'sustained'
	/** each connection publishes `backlog` messages at once, as a gateway replaying its buffer does */
	| 'burst';

export interface InitMsg {
	type: 'init';
	url: string;
	conns: ConnSpec[];
	qos: 0 | 1;
	/** QoS 1: PUBACKs awaited per connection at most; 0 = unbounded */
	window: number;
	mode: PublishMode;
	seconds: number;
	backlog: number;
	/** sample ts of k = 0; message k of a shaft carries ts0 + k × 1000 */
	ts0: number;
	/** QoS 0: publish only up to the total the bench has allowed (see ingest.ts, credit) */
	credit: boolean;
}

export type ToPublisher =
	| InitMsg
	| { type: 'go' }
	/** total messages this publisher may have sent so far (QoS 0 credit) */
	| { type: 'allow'; total: number }
	| { type: 'close' };

export interface PublisherResult {
	sent: number;
	acked: number;
	errors: number;
	firstErrors: string[];
	/** epoch ms of the first publish and of the moment everything was written (QoS 0) or acknowledged (QoS 1) */
	startedAt: number;
	finishedAt: number;
	/** send time (epoch ms) of every message, per shaft, indexed by k */
	sentAt: { g: number; times: Float64Array }[];
	/** CPU time of this publisher (ms) while publishing; a thread reports its process's */
	cpuMs: number;
}

export type FromPublisher =
	| { type: 'ready'; connected: number; failed: string[] }
	| ({ type: 'done' } & PublisherResult)
	| { type: 'closed' };

export const PREFIX = 'aftwater/v1';

/** marks a process or thread as a bench publisher (publisher.ts starts only then) */
export const PUBLISHER_ROLE = 'aftwater-bench-publisher';

/** Sample ts of message k (1 Hz per shaft, strictly increasing, starting days in the past). */
export const sampleTs = (ts0: number, k: number) => ts0 + k * 1000;

/**
 * Readings of a telemetry message per the contract (DESIGN.md §4): values
 * with the decimals a gateway's float formatting gives, flow above the bench
 * shafts' minimum (600 mm × 0.15 = 90 L/min) so nothing alarms by design.
 */
function readings(r: number): string {
	const flow = (104 + 30 * r).toFixed(7);
	const supply = (1.6 + 0.4 * r).toFixed(8);
	const temp = (13.5 + 2 * (1 - r)).toFixed(7);
	const rpm = (108 + 6 * r).toFixed(6);
	return `"flow_lpm":${flow},"supply_bar":${supply},"temp_c":${temp},"shaft_rpm":${rpm}`;
}

/** A fixed pool of readings, so formatting numbers does not take publisher CPU from the server on 2 cores. */
const POOL = Array.from({ length: 1024 }, (_, i) =>
	readings((((i * 0.618034) % 1) + 0.5 / 1024) % 1)
);

/** Message k of shaft g, 110 bytes (PERFORMANCE.md measured with 144). */
export function telemetryBody(ts: number, g: number, k: number): string {
	return `{"ts":${ts},${POOL[(g * 131 + k) & 1023]}}`;
}
