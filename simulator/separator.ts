/**
 * The cyclonic separator of one vessel: sediment collects in it and raises its
 * differential pressure; a purge (the valve open for some seconds) dumps the
 * sediment overboard and ΔP falls sharply. The valve can be stuck shut (the
 * server then sees a missed purge) or stuck open.
 */
import { uniform, type Rng } from './rng';

/** Sediment build-up at normal water quality, bar of ΔP per hour (0.2 → 0.8 bar over ~3 h). */
export const NORMAL_BUILDUP_BAR_PER_H = 0.2;
/** With the clogging fault (silt-laden estuary water), bar per hour: an alarm within minutes. */
export const CLOGGING_BUILDUP_BAR_PER_H = 12;
/** The sediment flushes out with this time constant while the valve is open, s. */
const FLUSH_TAU_S = 4;
/** ΔP from sediment cannot grow past this, bar (the cyclone chokes, flow is what falls). */
const MAX_SEDIMENT_BAR = 2.5;
/** How long a valve stuck open stays open, s (10 minutes: long enough to be noticed). */
export const DEFAULT_STUCK_OPEN_S = 600;

export type ValveState = 'open' | 'closed';
export type PurgeResult = 'opened' | 'extended' | 'ignored';

export interface SeparatorFaults {
	clogging: boolean;
	stuckValve: boolean;
	valveStuckOpen: boolean;
}

export class SeparatorModel {
	valve: ValveState = 'closed';
	readonly faults: SeparatorFaults = { clogging: false, stuckValve: false, valveStuckOpen: false };
	/** ΔP of the clean separator at design flow, bar */
	private readonly cleanBar: number;
	/** ΔP added by collected sediment at design flow, bar */
	sedimentBar: number;
	private openLeftS = 0;
	private stuckOpenLeftS = 0;
	/** mean Q / Q_design over the vessel's shafts */
	private flowRatio = 1;

	constructor(
		rng: Rng,
		private readonly stuckOpenS = DEFAULT_STUCK_OPEN_S
	) {
		this.cleanBar = uniform(rng, 0.15, 0.22);
		this.sedimentBar = uniform(rng, 0.05, 0.2);
	}

	/**
	 * The true ΔP, bar: the cyclone's own loss goes with the square of flow, the
	 * loss through packed sediment with flow itself (Darcy's law for a porous bed).
	 */
	get dpBar(): number {
		return this.cleanBar * this.flowRatio ** 2 + this.sedimentBar * this.flowRatio;
	}

	setFault(name: keyof SeparatorFaults, on: boolean): void {
		this.faults[name] = on;
		if (name === 'valveStuckOpen' && on && this.valve === 'open')
			this.stuckOpenLeftS = this.stuckOpenS;
	}

	/** A purge command: opens the valve for `durationS`, unless the valve is stuck. */
	purge(durationS: number): PurgeResult {
		if (this.faults.stuckValve) return 'ignored';
		if (this.valve === 'open') {
			this.openLeftS = Math.max(this.openLeftS, durationS);
			return 'extended';
		}
		this.valve = 'open';
		this.openLeftS = durationS;
		if (this.faults.valveStuckOpen) this.stuckOpenLeftS = this.stuckOpenS;
		return 'opened';
	}

	/** Advances by dtS; returns the valve's new state when it changed. */
	step(dtS: number, flowRatio: number): ValveState | null {
		this.flowRatio = Math.max(0, Math.min(1.5, flowRatio));
		const rate = this.faults.clogging ? CLOGGING_BUILDUP_BAR_PER_H : NORMAL_BUILDUP_BAR_PER_H;
		// Sediment arrives with the water, so a stopped pump collects none.
		this.sedimentBar = Math.min(
			MAX_SEDIMENT_BAR,
			this.sedimentBar + (rate * this.flowRatio * dtS) / 3600
		);
		if (this.valve !== 'open') return null;
		this.sedimentBar *= Math.exp(-dtS / FLUSH_TAU_S);
		if (this.faults.stuckValve) return null; // seized where it is
		this.openLeftS -= dtS;
		this.stuckOpenLeftS -= dtS;
		const heldOpen = this.faults.valveStuckOpen && this.stuckOpenLeftS > 0;
		if (this.openLeftS <= 0 && !heldOpen) {
			this.valve = 'closed';
			return 'closed';
		}
		return null;
	}
}
