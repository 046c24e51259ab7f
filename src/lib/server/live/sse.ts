/**
 * Server-sent events (WHATWG HTML §9.2): one text/event-stream per client,
 * with the bytes of each message encoded once and written to every client of
 * the same vessel. A client too slow to take what is sent is dropped (its
 * EventSource reconnects and fills the gap with Last-Event-ID) rather than
 * buffered without bound.
 */
const encoder = new TextEncoder();

/** One SSE message: `id`, `event` and one `data` line (JSON has no raw newlines). */
export function sseMessage(event: string, data: unknown, id?: string): Uint8Array {
	const idLine = id === undefined ? '' : `id: ${id}\n`;
	return encoder.encode(`${idLine}event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
}

/** a real event (not a comment) so the browser can tell a quiet stream from a dead one */
export const HEARTBEAT = encoder.encode('event: ping\ndata: {}\n\n');
/** tells EventSource how soon to reconnect after the stream ends (ms) */
export const RETRY = encoder.encode('retry: 2000\n\n');

/** Bytes a client may have queued before it counts as stalled. */
const MAX_QUEUED_BYTES = 4 * 1024 * 1024;

export class SseClient {
	#controller: ReadableStreamDefaultController<Uint8Array> | null = null;
	closed = false;
	onClose: () => void = () => {};
	readonly stream: ReadableStream<Uint8Array>;

	constructor() {
		this.stream = new ReadableStream<Uint8Array>(
			{
				start: (controller) => {
					this.#controller = controller;
				},
				cancel: () => this.#end()
			},
			{ highWaterMark: MAX_QUEUED_BYTES, size: (chunk) => chunk.byteLength }
		);
	}

	send(bytes: Uint8Array): void {
		if (this.closed || !this.#controller) return;
		if ((this.#controller.desiredSize ?? 0) <= 0) {
			this.close(); // stalled: drop it, it will reconnect and resume
			return;
		}
		try {
			this.#controller.enqueue(bytes);
		} catch {
			this.#end();
		}
	}

	close(): void {
		if (this.closed) return;
		try {
			this.#controller?.close();
		} catch {
			/* already closed by the other side */
		}
		this.#end();
	}

	#end() {
		if (this.closed) return;
		this.closed = true;
		this.onClose();
	}
}

export function sseResponse(client: SseClient): Response {
	return new Response(client.stream, {
		headers: {
			'content-type': 'text/event-stream; charset=utf-8',
			'cache-control': 'no-cache, no-transform',
			connection: 'keep-alive',
			'x-accel-buffering': 'no' // nginx: do not buffer the stream
		}
	});
}
