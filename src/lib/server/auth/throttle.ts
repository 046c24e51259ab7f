/**
 * Failed sign-in throttle, per account and per client address. A sliding
 * window of failures; once over the limit the key is locked until the oldest
 * failure in the window has aged out. In memory: a restart forgets, which is
 * acceptable for a single-server product (documented in DEVELOPERS.md).
 */
export interface ThrottleOptions {
	/** failures allowed in the window before the key is locked */
	limit: number;
	windowMs: number;
}

export class FailureThrottle {
	#failures = new Map<string, number[]>();
	constructor(private readonly options: ThrottleOptions) {}

	/** ms until the key may try again; 0 when it may try now */
	retryAfterMs(key: string, now = Date.now()): number {
		const list = this.#prune(key, now);
		if (list.length < this.options.limit) return 0;
		return list[0] + this.options.windowMs - now;
	}

	fail(key: string, now = Date.now()): void {
		const list = this.#prune(key, now);
		list.push(now);
		this.#failures.set(key, list);
		if (this.#failures.size > 50_000) this.#sweep(now); // bound memory under a spray of keys
	}

	reset(key: string): void {
		this.#failures.delete(key);
	}

	#prune(key: string, now: number): number[] {
		const list = this.#failures.get(key) ?? [];
		const cutoff = now - this.options.windowMs;
		while (list.length && list[0] <= cutoff) list.shift();
		if (!list.length) this.#failures.delete(key);
		return list;
	}

	#sweep(now: number) {
		for (const key of [...this.#failures.keys()]) this.#prune(key, now);
	}
}

/**
 * Per 15 minutes: 5 failures for an account from one client address; 50 for an account from all
 * addresses together (so guessing from many addresses is bounded too); 20 per client address
 * across accounts (several users share a ship's NAT). Locking an account only at the pair's limit
 * means that somebody guessing from one address cannot lock the chief engineer out everywhere
 * during an incident. (Limits: common practice, after OWASP's authentication guidance.)
 */
export function createSignInThrottles() {
	return {
		pair: new FailureThrottle({ limit: 5, windowMs: 15 * 60_000 }),
		account: new FailureThrottle({ limit: 50, windowMs: 15 * 60_000 }),
		address: new FailureThrottle({ limit: 20, windowMs: 15 * 60_000 })
	};
}
export type SignInThrottles = ReturnType<typeof createSignInThrottles>;
