/**
 * The simulated physics of one vessel's stern-tube water supply, with no I/O:
 * per shaft a duty pump on a pump curve working against the separator and the
 * bearing, a standby pump, the sensors (with their faults), and the vessel's
 * separator and voyage. Deterministic for a seed and a sequence of steps.
 */
import { minimumFlow } from '../src/lib/flow';
import { seaPressureAtCentreline } from '../src/lib/seawater';
import type { WaterKind } from '../src/lib/types';
import type { Fault, ShaftFault } from './faults';
import { gaussian, mulberry32, subSeed, uniform, type Rng } from './rng';
import { SeparatorModel, type PurgeResult, type ValveState } from './separator';
import { Voyage } from './voyage';

export interface SimShaft {
	code: string;
	diameter_mm: number;
	centreline_depth_m: number;
	/** rev/min at full ahead; derived from the diameter when absent */
	rated_rpm?: number;
}

export interface SimVessel {
	code: string;
	water: WaterKind;
	shafts: SimShaft[];
	salinity_psu?: number | null;
	/** surrounding water temperature, °C; seeded when absent */
	sea_temp_c?: number;
}

export interface TelemetryReading {
	flow_lpm: number;
	supply_bar: number;
	temp_c: number;
	shaft_rpm: number;
}

export interface SeparatorReading {
	dp_bar: number;
	purge_valve: ValveState;
}

export interface ModelOptions {
	/** delay before the standby pump starts after a duty pump trips, s */
	standbyDelayS?: number;
	/** how long a valve stuck open stays open, s */
	stuckOpenS?: number;
}

export type ModelFault = Exclude<Fault, 'offline'>;

export const DEFAULT_STANDBY_DELAY_S = 45;
/** Design flow / pump run-out flow: a centrifugal pump sized to run left of its curve's end. */
const DESIGN_POINT_OF_RUNOUT = 0.75;
/** ΔP across the separator at which each supply is designed, bar */
const DESIGN_SEPARATOR_DP_BAR = 0.3;
/** Pumps spin up and coast down with this time constant, s: a trip shows within seconds. */
const PUMP_TAU_S = 1.5;
/** Flow kept up by the ship's motion and head of water with no pump running, share of design */
const RESIDUAL_SHARE = 0.03;
/** Share of the supply that goes overboard with the sediment while the purge valve is open */
const PURGE_DIVERSION = 0.1;
/** Heat rise of the water through the bearing at rated speed and design flow, K */
const BEARING_HEAT_K = 2;
const PUMP_HEAT_K = 0.2;
const MAX_HEAT_K = 12;
const THERMAL_TAU_S = 90;
/** A drifting flow sensor loses this share of calibration per minute, up to MAX_DRIFT */
const DRIFT_PER_MIN = 0.02;
const MAX_DRIFT = 0.6;

const round = (value: number, places: number) => {
	const f = 10 ** places;
	return Math.round(value * f) / f;
};
const lag = (value: number, target: number, dtS: number, tauS: number) =>
	value + (target - value) * (1 - Math.exp(-dtS / tauS));

/** Larger shafts turn slower: about 100 rpm at 600 mm, 400 rpm at 150 mm. */
export const ratedRpm = (diameterMm: number) =>
	Math.round(Math.min(600, Math.max(80, 60_000 / diameterMm)));

export class ShaftModel {
	readonly minFlowLpm: number;
	readonly designFlowLpm: number;
	readonly ratedRpm: number;
	/** pump shut-off head, bar */
	private readonly shutoffBar: number;
	/** bearing and line resistance, bar per (L/min)² */
	private readonly resistance: number;
	private readonly runoutLpm: number;
	/** true flow to the bearing, L/min */
	flowLpm: number;
	/** true water temperature leaving the bearing, °C */
	tempC: number;
	/** true supply pressure at the stern tube, gauge bar */
	supplyBar = 0;
	pump: 'duty' | 'standby' | 'none' = 'duty';
	private tripElapsedS: number | null = null;
	drift = 0;
	private driftSign = 1;
	private frozenFlow: number | null = null;
	private lastFlowReading: number | null = null;
	readonly faults = { pumpTrip: false, driftingSensor: false, deadSensor: false };

	constructor(
		readonly spec: SimShaft,
		rng: Rng,
		private readonly noise: Rng,
		private readonly standbyDelayS: number,
		seaTempC: number
	) {
		this.minFlowLpm = minimumFlow(spec.diameter_mm);
		this.designFlowLpm = this.minFlowLpm * uniform(rng, 1.7, 2.3);
		this.ratedRpm = spec.rated_rpm ?? ratedRpm(spec.diameter_mm);
		const excessBar = uniform(rng, 0.7, 1.2);
		this.resistance = excessBar / this.designFlowLpm ** 2;
		this.runoutLpm = this.designFlowLpm / DESIGN_POINT_OF_RUNOUT;
		this.shutoffBar = (excessBar + DESIGN_SEPARATOR_DP_BAR) / (1 - DESIGN_POINT_OF_RUNOUT ** 2);
		this.flowLpm = this.designFlowLpm;
		this.tempC = seaTempC + PUMP_HEAT_K + BEARING_HEAT_K * 0.8;
	}

	/** Where the pump curve H0·s·(1 − (Q/Qr)²) − ΔP_sep meets the bearing's R·Q², L/min. */
	operatingFlow(separatorDpBar: number, strength: number): number {
		const head = this.shutoffBar * strength - separatorDpBar;
		if (head <= 0) return 0;
		const x2 = head / (this.shutoffBar * strength + this.resistance * this.runoutLpm ** 2);
		return this.runoutLpm * Math.sqrt(x2);
	}

	setFault(fault: ShaftFault, on: boolean): void {
		if (fault === 'pump-trip') {
			this.faults.pumpTrip = on;
			this.pump = on ? 'none' : 'duty';
			this.tripElapsedS = on ? 0 : null;
		} else if (fault === 'drifting-sensor') {
			if (on && !this.faults.driftingSensor) this.driftSign = this.noise() < 0.5 ? -1 : 1;
			this.faults.driftingSensor = on;
			if (!on) this.drift = 0;
		} else {
			this.faults.deadSensor = on;
			this.frozenFlow = on ? (this.lastFlowReading ?? this.flowLpm) : null;
		}
	}

	step(
		dtS: number,
		ctx: {
			separatorDpBar: number;
			valveOpen: boolean;
			speedFraction: number;
			seaBar: number;
			seaTempC: number;
		}
	): void {
		if (this.tripElapsedS !== null) {
			this.tripElapsedS += dtS;
			if (this.pump === 'none' && this.tripElapsedS >= this.standbyDelayS) this.pump = 'standby';
		}
		const residual = RESIDUAL_SHARE * this.designFlowLpm;
		// The standby pump is the older one of the pair: a little weaker.
		const strength = this.pump === 'duty' ? 1 : this.pump === 'standby' ? 0.95 : 0;
		let target = Math.max(residual, this.operatingFlow(ctx.separatorDpBar, strength));
		if (ctx.valveOpen) target *= 1 - PURGE_DIVERSION;
		this.flowLpm = lag(this.flowLpm, target, dtS, PUMP_TAU_S);
		this.supplyBar = ctx.seaBar + this.resistance * this.flowLpm ** 2;

		// Friction heat goes with speed squared; less water carries it away hotter.
		const carry = this.designFlowLpm / Math.max(this.flowLpm, 0.05 * this.designFlowLpm);
		const heat = Math.min(MAX_HEAT_K, BEARING_HEAT_K * ctx.speedFraction ** 2 * carry);
		this.tempC = lag(this.tempC, ctx.seaTempC + PUMP_HEAT_K + heat, dtS, THERMAL_TAU_S);

		if (this.faults.driftingSensor) {
			const next = this.drift + (this.driftSign * DRIFT_PER_MIN * dtS) / 60;
			this.drift = Math.max(-MAX_DRIFT, Math.min(MAX_DRIFT, next));
		}
	}

	/** What the gateway's sensors report now, with their noise and faults. */
	read(speedFraction: number): TelemetryReading {
		const n = () => gaussian(this.noise);
		let flow: number;
		if (this.frozenFlow !== null) flow = this.frozenFlow;
		else {
			const measured =
				this.flowLpm * (1 + this.drift) * (1 + 0.008 * n()) + 0.002 * this.minFlowLpm * n();
			flow = round(Math.max(0, measured), 2);
			this.lastFlowReading = flow;
		}
		const rpm = speedFraction * this.ratedRpm;
		return {
			flow_lpm: flow,
			supply_bar: round(Math.max(0, this.supplyBar + 0.004 * n()), 3),
			temp_c: round(this.tempC + 0.03 * n(), 2),
			shaft_rpm: rpm < 0.5 ? 0 : round(rpm + 0.2 * n(), 1)
		};
	}
}

export class VesselModel {
	readonly voyage: Voyage;
	readonly separator: SeparatorModel;
	readonly shafts: Map<string, ShaftModel>;
	readonly seaTempC: number;
	private readonly noise: Rng;

	constructor(
		readonly spec: SimVessel,
		seed: number,
		options: ModelOptions = {}
	) {
		const rng = mulberry32(subSeed(seed, spec.code));
		this.noise = mulberry32(subSeed(seed, `${spec.code}#noise`));
		this.seaTempC = spec.sea_temp_c ?? round(uniform(rng, 8, 24), 1);
		this.voyage = new Voyage(rng);
		this.separator = new SeparatorModel(rng, options.stuckOpenS);
		const standby = options.standbyDelayS ?? DEFAULT_STANDBY_DELAY_S;
		this.shafts = new Map(
			spec.shafts.map((s) => {
				const shaftRng = mulberry32(subSeed(seed, `${spec.code}/${s.code}`));
				const noise = mulberry32(subSeed(seed, `${spec.code}/${s.code}#noise`));
				return [s.code, new ShaftModel(s, shaftRng, noise, standby, this.seaTempC)];
			})
		);
	}

	shaft(code: string): ShaftModel {
		const shaft = this.shafts.get(code);
		if (!shaft) throw new Error(`${this.spec.code} has no shaft "${code}"`);
		return shaft;
	}

	/** Advances the physics by dtS seconds; returns the valve's new state when it changed. */
	step(dtS: number): ValveState | null {
		if (!(dtS > 0)) return null;
		this.voyage.step(dtS);
		let factor = 0;
		for (const s of this.shafts.values()) factor += s.flowLpm / s.designFlowLpm;
		const change = this.separator.step(dtS, factor / Math.max(1, this.shafts.size));
		const depthOffset = this.voyage.depthOffsetM();
		for (const s of this.shafts.values()) {
			const seaBar = seaPressureAtCentreline(
				s.spec.centreline_depth_m + depthOffset,
				this.spec.water,
				{
					salinityPsu: this.spec.salinity_psu,
					tempC: this.seaTempC
				}
			);
			s.step(dtS, {
				separatorDpBar: this.separator.dpBar,
				valveOpen: this.separator.valve === 'open',
				speedFraction: this.voyage.speedFraction,
				seaBar,
				seaTempC: this.seaTempC
			});
		}
		return change;
	}

	readShaft(code: string): TelemetryReading {
		return this.shaft(code).read(this.voyage.speedFraction);
	}

	readSeparator(): SeparatorReading {
		const dp = this.separator.dpBar + 0.004 * gaussian(this.noise);
		return { dp_bar: round(Math.max(0, dp), 3), purge_valve: this.separator.valve };
	}

	purge(durationS: number): PurgeResult {
		return this.separator.purge(durationS);
	}

	/** Turns a fault on or off; a shaft fault without a shaft applies to every shaft. */
	setFault(fault: ModelFault, on: boolean, shaftCode?: string): void {
		if (fault === 'clogging') this.separator.setFault('clogging', on);
		else if (fault === 'stuck-valve') this.separator.setFault('stuckValve', on);
		else if (fault === 'valve-stuck-open') this.separator.setFault('valveStuckOpen', on);
		else if (shaftCode !== undefined) this.shaft(shaftCode).setFault(fault, on);
		else for (const s of this.shafts.values()) s.setFault(fault, on);
	}
}
