/**
 * The gateway simulator: plays a fleet of vessel gateways against an MQTT
 * broker, one connection per vessel with its own credentials, following the
 * telemetry contract v1. Used by `npm run simulate`, by the demo (started
 * beside the app) and by tests.
 */
import { demoGatewayPassword, gatewayUsername } from '../src/lib/server/demo/fleet';
import { formatFaultSpec, isShaftFault, type Fault, type FaultSpec } from './faults';
import { demoFleet } from './fleet';
import { Gateway, type Credentials } from './gateway';
import { VesselModel, type SimVessel } from './model';
import { mulberry32, subSeed } from './rng';
import { emptyStats, type SimulatorStats } from './stats';
import { startTimetable } from './timetable';
import type { VoyageMode } from './voyage';

export type { Credentials } from './gateway';
export type { SimShaft, SimVessel } from './model';
export type { Fault, FaultSpec } from './faults';
export type { SimulatorStats, CommandRecord } from './stats';

export interface SimulatorOptions {
	/** broker URL, mqtt://host:port; default mqtt://localhost:1883 */
	url?: string;
	/** topic prefix; default aftwater/v1 */
	prefix?: string;
	/** the vessels to play; default the demo fleet */
	vessels?: SimVessel[];
	/** each gateway's sign-in; default the demo gateways' (gw-{code}, derived from demoPassword) */
	credentials?: (vesselCode: string) => Credentials;
	/** the demo password the default credentials derive from; default aftwater-demo */
	demoPassword?: string;
	/** telemetry samples per second per shaft, > 0 and ≤ 50; default 1 */
	rateHz?: number;
	/** separator state period, s; default 1 */
	separatorIntervalS?: number;
	/** seeds every model and noise stream; default 1 */
	seed?: number;
	/** play the demo timetable; default false */
	timetable?: boolean;
	/** faults switched on at start */
	faults?: FaultSpec[];
	/** standby pump start delay after a pump trip, s; default 45 */
	standbyDelayS?: number;
	/** length of an `offline` outage, s; default 60 */
	offlineS?: number;
	/** most messages one gateway buffers while its link is down; default 200 000 */
	maxBacklog?: number;
	/** one line per event worth telling; default console.log */
	log?: (line: string) => void;
}

export interface GatewayState {
	vessel: string;
	connected: boolean;
	offline: boolean;
	backlog: number;
}

export interface Simulator {
	readonly vessels: readonly SimVessel[];
	/** Turns a fault on or off; a shaft fault without a shaft applies to every shaft. Throws for unknown codes. */
	setFault(vesselCode: string, fault: Fault, on: boolean, shaftCode?: string): void;
	/** The faults on now (shaft faults one entry per shaft). */
	activeFaults(): FaultSpec[];
	/** Holds a vessel in port, manoeuvring or steaming; null lets it follow its own voyage. */
	pinVoyage(vesselCode: string, mode: VoyageMode | null): void;
	/** A copy of the counters: messages acknowledged per topic, commands received, replays. */
	stats(): SimulatorStats;
	gateways(): GatewayState[];
	/** The simulated physics of a vessel (true values behind the readings). */
	model(vesselCode: string): VesselModel;
	/** Stops sampling, publishes each gateway's offline status, disconnects cleanly. */
	stop(): Promise<void>;
}

export const DEFAULT_URL = 'mqtt://localhost:1883';
export const DEFAULT_PREFIX = 'aftwater/v1';
export const DEFAULT_DEMO_PASSWORD = 'aftwater-demo';
export const MAX_RATE_HZ = 50;
const CODE = /^[a-z0-9-]+$/;

export async function startSimulator(options: SimulatorOptions = {}): Promise<Simulator> {
	const url = options.url ?? DEFAULT_URL;
	const prefix = (options.prefix ?? DEFAULT_PREFIX).replace(/\/+$/, '');
	const vessels = options.vessels ?? demoFleet();
	const rateHz = options.rateHz ?? 1;
	const seed = options.seed ?? 1;
	const log = options.log ?? ((line: string) => console.log(`[simulator] ${line}`));
	const demoPassword = options.demoPassword ?? DEFAULT_DEMO_PASSWORD;
	const credentials =
		options.credentials ??
		((code: string) => ({
			username: gatewayUsername(code),
			password: demoGatewayPassword(code, demoPassword)
		}));
	const offlineS = options.offlineS ?? 60;

	if (!(rateHz > 0 && rateHz <= MAX_RATE_HZ))
		throw new RangeError(`rateHz must be > 0 and ≤ ${MAX_RATE_HZ}`);
	if (!(offlineS > 0)) throw new RangeError('offlineS must be > 0');
	if (vessels.length === 0) throw new Error('no vessels to simulate');
	const seen = new Set<string>();
	for (const v of vessels) {
		if (!CODE.test(v.code) || seen.has(v.code))
			throw new Error(`vessel code "${v.code}" is invalid or repeated`);
		seen.add(v.code);
		if (v.shafts.length === 0) throw new Error(`vessel ${v.code} has no shafts`);
		for (const s of v.shafts) {
			if (!CODE.test(s.code)) throw new Error(`shaft code "${v.code}/${s.code}" is invalid`);
			if (!(s.diameter_mm > 0))
				throw new Error(`shaft ${v.code}/${s.code} needs a positive diameter_mm`);
		}
	}

	const stats = emptyStats();
	const phase = mulberry32(subSeed(seed, 'phase'));
	const models = new Map<string, VesselModel>();
	const gateways = new Map<string, Gateway>();
	for (const v of vessels) {
		const model = new VesselModel(v, seed, { standbyDelayS: options.standbyDelayS });
		models.set(v.code, model);
		gateways.set(
			v.code,
			new Gateway({
				url,
				prefix,
				model,
				credentials: credentials(v.code),
				rateHz,
				separatorIntervalS: options.separatorIntervalS ?? 1,
				maxBacklog: options.maxBacklog ?? 200_000,
				phase: phase(),
				stats,
				log
			})
		);
	}
	const faults = new Map<string, FaultSpec>();

	const modelOf = (code: string): VesselModel => {
		const model = models.get(code);
		if (!model) throw new Error(`no simulated vessel "${code}"`);
		return model;
	};

	const setFault = (vesselCode: string, fault: Fault, on: boolean, shaftCode?: string) => {
		const model = modelOf(vesselCode);
		if (!isShaftFault(fault) && shaftCode !== undefined) {
			throw new Error(`${fault} applies to a whole vessel, not a shaft`);
		}
		if (fault === 'offline') {
			const gateway = gateways.get(vesselCode)!;
			if (on) gateway.goOffline(offlineS);
			else gateway.comeBack();
			return;
		}
		if (!isShaftFault(fault)) {
			model.setFault(fault, on);
			track({ fault, vessel: vesselCode }, on);
			return;
		}
		const shafts = shaftCode === undefined ? model.spec.shafts.map((s) => s.code) : [shaftCode];
		for (const shaft of shafts) {
			model.setFault(fault, on, shaft); // throws for an unknown shaft
			track({ fault, vessel: vesselCode, shaft }, on);
		}
	};
	const track = (spec: FaultSpec, on: boolean) => {
		if (on) faults.set(formatFaultSpec(spec), spec);
		else faults.delete(formatFaultSpec(spec));
	};

	// Faults named at start show in the very first samples (and a bad name fails before any
	// connection is made); a link outage can only start once there is a link.
	const initial = options.faults ?? [];
	for (const f of initial) if (f.fault !== 'offline') setFault(f.vessel, f.fault, true, f.shaft);
	for (const f of initial) if (f.fault === 'offline') modelOf(f.vessel);
	await Promise.all([...gateways.values()].map((g) => g.start()));
	for (const f of initial) if (f.fault === 'offline') setFault(f.vessel, f.fault, true);

	const simulator: Simulator = {
		vessels,
		setFault,
		activeFaults: () => [
			...faults.values(),
			...[...gateways.values()]
				.filter((g) => g.offline)
				.map((g) => ({ fault: 'offline' as const, vessel: g.code }))
		],
		pinVoyage: (code, mode) => modelOf(code).voyage.pin(mode),
		stats: () => structuredClone(stats),
		gateways: () =>
			[...gateways.values()].map((g) => ({
				vessel: g.code,
				connected: g.connected,
				offline: g.offline,
				backlog: g.backlog
			})),
		model: modelOf,
		stop: async () => {
			stopTimetable?.();
			await Promise.all([...gateways.values()].map((g) => g.stop()));
		}
	};

	const stopTimetable = options.timetable
		? startTimetable(
				{
					hasVessel: (code, shaft) =>
						models.has(code) && (shaft === undefined || models.get(code)!.shafts.has(shaft)),
					setFault,
					pinVoyage: simulator.pinVoyage
				},
				log
			)
		: null;
	return simulator;
}
