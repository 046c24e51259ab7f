/**
 * An EventSource with an honest status: "live" only while messages (or the
 * server's keep-alive) keep arriving; "reconnecting" while the browser retries;
 * "offline" when the server refused us or the retries failed. The page must
 * never show old figures as if they were current.
 */
import type { StreamStatus } from './types';

/** the server sends a keep-alive every 15 s; past this the stream is presumed broken */
const SILENCE_MS = 35_000;

export class LiveStream {
	status = $state<StreamStatus>('connecting');
	lastMessageAt = $state(0);
	#source: EventSource | null = null;
	#watchdog: ReturnType<typeof setInterval> | null = null;
	#retry: ReturnType<typeof setTimeout> | null = null;
	#lastEventId: string | null = null;
	#closed = false;

	constructor(
		private readonly url: string,
		private readonly handlers: Record<string, (data: unknown) => void>
	) {}

	open() {
		this.#closed = false;
		this.#connect();
		this.#watchdog = setInterval(() => {
			if (this.status === 'live' && Date.now() - this.lastMessageAt > SILENCE_MS) {
				this.status = 'reconnecting';
				this.#reopen();
			}
		}, 5_000);
	}

	#connect() {
		// EventSource sends Last-Event-ID itself on its own retries; after we
		// re-create it we pass the id in the query instead.
		const url = this.#lastEventId
			? `${this.url}${this.url.includes('?') ? '&' : '?'}last_event_id=${this.#lastEventId}`
			: this.url;
		const source = new EventSource(url);
		this.#source = source;
		source.onopen = () => {
			this.status = 'live';
			this.lastMessageAt = Date.now();
		};
		source.onerror = () => {
			if (this.#closed) return;
			if (source.readyState === EventSource.CLOSED) {
				// refused (401/404) or failed for good: try again later, say so meanwhile
				this.status = 'offline';
				this.#retry = setTimeout(() => this.#reopen(), 5_000);
			} else {
				this.status = 'reconnecting';
			}
		};
		for (const [event, handle] of Object.entries(this.handlers)) {
			source.addEventListener(event, (e) => {
				const msg = e as MessageEvent<string>;
				this.lastMessageAt = Date.now();
				this.status = 'live';
				if (msg.lastEventId) this.#lastEventId = msg.lastEventId;
				try {
					handle(JSON.parse(msg.data));
				} catch (err) {
					console.error(`live ${event}:`, err);
				}
			});
		}
	}

	#reopen() {
		if (this.#closed) return;
		this.#source?.close();
		if (this.#retry) clearTimeout(this.#retry);
		this.#connect();
	}

	close() {
		this.#closed = true;
		this.#source?.close();
		if (this.#watchdog) clearInterval(this.#watchdog);
		if (this.#retry) clearTimeout(this.#retry);
		this.status = 'offline';
	}
}
