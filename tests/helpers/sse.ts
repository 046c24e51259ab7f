/** A minimal server-sent-events reader over fetch, for tests and the live benchmark. */
export interface SseEvent {
	id?: string;
	event: string;
	data: string;
	receivedAt: number;
}

export interface SseConnection {
	status: number;
	events: SseEvent[];
	/** resolves with the first event matching, searching those received from index `since` (default: all) */
	next(match: (e: SseEvent) => boolean, options?: { timeoutMs?: number; since?: number }): Promise<SseEvent>;
	lastEventId(): string | undefined;
	close(): void;
	closed: Promise<void>;
}

export async function openSse(url: string, headers: Record<string, string> = {}): Promise<SseConnection> {
	const abort = new AbortController();
	const res = await fetch(url, { headers: { accept: 'text/event-stream', ...headers }, signal: abort.signal });
	const events: SseEvent[] = [];
	const waiters: { match: (e: SseEvent) => boolean; resolve: (e: SseEvent) => void }[] = [];
	let resolveClosed: () => void = () => {};
	const closed = new Promise<void>((r) => (resolveClosed = r));
	if (res.ok && res.body) {
		(async () => {
			const decoder = new TextDecoder();
			let buffer = '';
			try {
				for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
					buffer += decoder.decode(chunk, { stream: true });
					let cut;
					while ((cut = buffer.indexOf('\n\n')) >= 0) {
						const block = buffer.slice(0, cut);
						buffer = buffer.slice(cut + 2);
						const e: SseEvent = { event: 'message', data: '', receivedAt: Date.now() };
						let hasData = false;
						for (const line of block.split('\n')) {
							if (line.startsWith(':')) continue;
							const [field, ...rest] = line.split(':');
							const value = rest.join(':').replace(/^ /, '');
							if (field === 'id') e.id = value;
							else if (field === 'event') e.event = value;
							else if (field === 'data') {
								e.data += (hasData ? '\n' : '') + value;
								hasData = true;
							}
						}
						if (!hasData) continue;
						events.push(e);
						for (const w of [...waiters]) {
							if (w.match(e)) {
								waiters.splice(waiters.indexOf(w), 1);
								w.resolve(e);
							}
						}
					}
				}
			} catch {
				/* aborted or the server went away */
			}
			resolveClosed();
		})();
	} else {
		resolveClosed();
	}
	return {
		status: res.status,
		events,
		closed,
		lastEventId: () => [...events].reverse().find((e) => e.id)?.id,
		next(match, { timeoutMs = 10_000, since } = {}) {
			const start = since ?? 0;
			const found = events.slice(start).find(match);
			if (found) return Promise.resolve(found);
			return new Promise((resolve, reject) => {
				const timer = setTimeout(() => reject(new Error('timed out waiting for an SSE event')), timeoutMs);
				waiters.push({
					match,
					resolve: (e) => {
						clearTimeout(timer);
						resolve(e);
					}
				});
			});
		},
		close: () => abort.abort()
	};
}
