/** Ingest counters and rates for /api/health and the admin page. */
export class IngestStats {
	received_total = 0;
	stored_total = 0;
	duplicate_total = 0;
	rejected_total = 0;
	rejected_by_reason: Record<string, number> = {};
	/** gateway clocks found to have gone back (pipeline.ts, clockSteps) */
	clock_steps_total = 0;
	/** ms from the oldest message of the last committed batch arriving to its commit */
	write_lag_ms = 0;
	#lags: number[] = [];
	#perSecond = new Map<number, number>();

	received(now: number) {
		this.received_total++;
		const s = Math.floor(now / 1000);
		this.#perSecond.set(s, (this.#perSecond.get(s) ?? 0) + 1);
		if (this.#perSecond.size > 20) {
			for (const key of this.#perSecond.keys()) if (key < s - 15) this.#perSecond.delete(key);
		}
	}

	rejected(reason: string) {
		this.rejected_total++;
		this.rejected_by_reason[reason] = (this.rejected_by_reason[reason] ?? 0) + 1;
	}

	committed(stored: number, duplicates: number, lagMs: number) {
		this.stored_total += stored;
		this.duplicate_total += duplicates;
		this.write_lag_ms = lagMs;
		this.#lags.push(lagMs);
		if (this.#lags.length > 500) this.#lags.splice(0, this.#lags.length - 500);
	}

	/** messages per second over the last 10 whole seconds */
	rate(now = Date.now()): number {
		const s = Math.floor(now / 1000);
		let sum = 0;
		for (let k = s - 10; k < s; k++) sum += this.#perSecond.get(k) ?? 0;
		return sum / 10;
	}

	lagPercentile(p: number): number {
		if (!this.#lags.length) return 0;
		const sorted = [...this.#lags].sort((a, b) => a - b);
		return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))];
	}
}
