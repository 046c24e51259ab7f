/**
 * What the ship is doing, per vessel: lying in port with the shafts stopped,
 * manoeuvring at changing speeds, or steaming steadily; how deep it floats
 * (draft drifts slowly with trim and load) and the heave of the waves. The
 * shafts of one vessel follow the same orders from the bridge.
 */
import { chance, gaussian, uniform, type Rng } from './rng';

export type VoyageMode = 'port' | 'manoeuvring' | 'steaming';

/** How long each mode lasts, s: short enough that a demo visitor sees changes. */
const MODE_DURATION_S: Record<VoyageMode, [number, number]> = {
	port: [180, 480],
	manoeuvring: [90, 240],
	steaming: [600, 1500]
};
/** Fraction of rated shaft speed per mode. */
const STEAMING_FRACTION: [number, number] = [0.82, 0.95];
const MANOEUVRING_FRACTION: [number, number] = [0.15, 0.6];
/** The governor ramps at most this fraction of rated speed per second (0 → full in ~30 s). */
const RAMP_PER_S = 1 / 30;
/** Largest slow change of the centreline depth from trim and load, m. */
const DRAFT_SWING_M = 0.35;
/** Draft follows its target with this time constant, s (trim and load change slowly). */
const DRAFT_TAU_S = 900;
/** Wave heave amplitude at the stern, m, by mode (sheltered in port). */
const HEAVE_M: Record<VoyageMode, number> = { port: 0.02, manoeuvring: 0.06, steaming: 0.12 };

export class Voyage {
	mode: VoyageMode;
	/** current shaft speed as a fraction of rated */
	speedFraction: number;
	private targetFraction: number;
	private modeLeftS: number;
	private retargetS = 0;
	private draftOffsetM = 0;
	private draftTargetM = 0;
	private draftRetargetS = 0;
	private wavePhase: number;
	private readonly wavePeriodS: number;
	private pinned: VoyageMode | null = null;

	constructor(private readonly rng: Rng) {
		// Start under way, so shafts turn and their alarms are live from the first minute.
		this.mode = 'steaming';
		this.targetFraction = uniform(rng, ...STEAMING_FRACTION);
		this.speedFraction = this.targetFraction;
		this.modeLeftS = uniform(rng, ...MODE_DURATION_S.steaming);
		this.wavePhase = uniform(rng, 0, 2 * Math.PI);
		this.wavePeriodS = uniform(rng, 6, 10);
	}

	/** Hold one mode (the demo timetable keeps a vessel at sea during its scenario); null frees it. */
	pin(mode: VoyageMode | null): void {
		this.pinned = mode;
		if (mode && mode !== this.mode) this.enter(mode);
	}

	/** Change of the centreline depth from its nominal value, m (slow draft plus wave heave). */
	depthOffsetM(): number {
		return this.draftOffsetM + HEAVE_M[this.mode] * Math.sin(this.wavePhase);
	}

	step(dtS: number): void {
		this.modeLeftS -= dtS;
		if (this.modeLeftS <= 0) {
			if (this.pinned) this.modeLeftS = MODE_DURATION_S[this.pinned][0];
			else this.enter(this.nextMode());
		}
		this.retargetS -= dtS;
		if (this.retargetS <= 0) this.retarget();

		const maxStep = RAMP_PER_S * dtS;
		const diff = this.targetFraction - this.speedFraction;
		this.speedFraction += Math.max(-maxStep, Math.min(maxStep, diff));

		this.draftRetargetS -= dtS;
		if (this.draftRetargetS <= 0) {
			this.draftTargetM = uniform(this.rng, -DRAFT_SWING_M, DRAFT_SWING_M);
			this.draftRetargetS = uniform(this.rng, 600, 1800);
		}
		this.draftOffsetM +=
			(this.draftTargetM - this.draftOffsetM) * (1 - Math.exp(-dtS / DRAFT_TAU_S));
		this.wavePhase = (this.wavePhase + (2 * Math.PI * dtS) / this.wavePeriodS) % (2 * Math.PI);
	}

	private nextMode(): VoyageMode {
		// port → manoeuvring → steaming → manoeuvring → port: a harbour call now and then.
		if (this.mode === 'port') return 'manoeuvring';
		if (this.mode === 'steaming') return 'manoeuvring';
		return this.speedFraction > 0.4 || chance(this.rng, 0.5) ? 'steaming' : 'port';
	}

	private enter(mode: VoyageMode): void {
		this.mode = mode;
		this.modeLeftS = uniform(this.rng, ...MODE_DURATION_S[mode]);
		this.retargetS = 0;
	}

	private retarget(): void {
		if (this.mode === 'port') {
			this.targetFraction = 0;
			this.retargetS = this.modeLeftS + 1;
		} else if (this.mode === 'steaming') {
			const [lo, hi] = STEAMING_FRACTION;
			const next = this.targetFraction + 0.01 * gaussian(this.rng);
			this.targetFraction = Math.max(
				lo,
				Math.min(hi, next > 0.5 ? next : uniform(this.rng, lo, hi))
			);
			this.retargetS = uniform(this.rng, 60, 180);
		} else {
			// Orders from the bridge while manoeuvring, with a stop now and then.
			this.targetFraction = chance(this.rng, 0.15) ? 0 : uniform(this.rng, ...MANOEUVRING_FRACTION);
			this.retargetS = uniform(this.rng, 20, 60);
		}
	}
}
