/**
 * The audible alarm: a two-tone chime, repeated, while an unacknowledged alarm
 * of priority 'alarm' stands and the user has not silenced it. Browsers only
 * play sound after a user gesture, so the user turns sound on once (remembered).
 */
const KEY = 'aftwater-sound';
const REPEAT_MS = 4_000;

export class Alerting {
	soundOn = $state(false);
	/** alarm ids the user silenced (until they are acknowledged or end) */
	silenced = $state<number[]>([]);
	#audio: AudioContext | null = null;
	#timer: ReturnType<typeof setInterval> | null = null;

	init() {
		try {
			this.soundOn = localStorage.getItem(KEY) === 'on';
		} catch {
			/* no storage: sound stays off until turned on */
		}
	}

	enableSound() {
		this.#audio ??= new AudioContext();
		void this.#audio.resume();
		this.soundOn = true;
		try {
			localStorage.setItem(KEY, 'on');
		} catch {
			/* still on for this page */
		}
		this.#chime();
	}

	disableSound() {
		this.soundOn = false;
		try {
			localStorage.setItem(KEY, 'off');
		} catch {
			/* off for this page */
		}
	}

	silence(ids: number[]) {
		this.silenced = [...new Set([...this.silenced, ...ids])];
	}

	/** call whenever the set of unacknowledged alarms changes */
	update(unacknowledgedIds: number[]) {
		const kept = this.silenced.filter((id) => unacknowledgedIds.includes(id));
		if (kept.length !== this.silenced.length) this.silenced = kept; // assigning always would loop the caller's effect
		const sounding = this.soundOn && unacknowledgedIds.some((id) => !this.silenced.includes(id));
		if (sounding && !this.#timer) {
			this.#chime();
			this.#timer = setInterval(() => this.#chime(), REPEAT_MS);
		} else if (!sounding && this.#timer) {
			clearInterval(this.#timer);
			this.#timer = null;
		}
	}

	#chime() {
		if (!this.soundOn) return;
		try {
			this.#audio ??= new AudioContext();
			const ctx = this.#audio;
			const tone = (freq: number, start: number) => {
				const osc = ctx.createOscillator();
				const gain = ctx.createGain();
				osc.frequency.value = freq;
				gain.gain.setValueAtTime(0.0001, ctx.currentTime + start);
				gain.gain.exponentialRampToValueAtTime(0.25, ctx.currentTime + start + 0.02);
				gain.gain.exponentialRampToValueAtTime(0.0001, ctx.currentTime + start + 0.35);
				osc.connect(gain).connect(ctx.destination);
				osc.start(ctx.currentTime + start);
				osc.stop(ctx.currentTime + start + 0.4);
			};
			tone(880, 0);
			tone(660, 0.45);
		} catch {
			/* no audio device: the banner still shows */
		}
	}

	stop() {
		if (this.#timer) clearInterval(this.#timer);
		this.#timer = null;
	}
}
