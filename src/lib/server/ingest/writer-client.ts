/**
 * The main thread's handle on the writer thread: sends batches one at a time
 * (so they commit in order), retries a batch that failed (e.g. the database
 * was busy), restarts a thread that died, and reports what was committed.
 */
import type { Worker } from 'node:worker_threads';
import type { FromWriter, ShaftRollupConfig, ToWriter, WriteBatch, WriteResult } from './batch';
import { spawnWriterThread } from './writer-thread';

const RETRY_MS = 500;

export class WriterClient {
	#worker!: Worker;
	#ready!: Promise<void>;
	#queue: WriteBatch[] = [];
	#inflight: WriteBatch | null = null;
	#config: ShaftRollupConfig[] = [];
	#stopping = false;
	#idleWaiters: (() => void)[] = [];
	onCommitted: (result: WriteResult, batch: WriteBatch) => void = () => {};

	constructor(private readonly databasePath: string) {
		this.#spawn();
	}

	#spawn() {
		this.#worker = spawnWriterThread(this.databasePath);
		this.#ready = new Promise((resolve, reject) => {
			const onMessage = (msg: FromWriter) => {
				if (msg.type === 'ready') {
					this.#worker.off('error', reject);
					resolve();
				}
			};
			this.#worker.once('message', onMessage);
			this.#worker.once('error', reject);
		});
		this.#worker.on('message', (msg: FromWriter) => this.#onMessage(msg));
		this.#worker.on('error', (err) => console.error('[aftwater] writer thread error:', err));
		this.#worker.on('exit', (code) => {
			if (this.#stopping) return;
			console.error(`[aftwater] writer thread exited (${code}); restarting`);
			this.#spawn();
			this.#post({ type: 'config', shafts: this.#config });
			if (this.#inflight) {
				this.#queue.unshift(this.#inflight);
				this.#inflight = null;
			}
			this.#pump();
		});
	}

	get ready() {
		return this.#ready;
	}

	/** rows not yet committed: queued batches and the one being written */
	get pending(): number {
		return this.#queue.length + (this.#inflight ? 1 : 0);
	}

	get busy(): boolean {
		return this.#inflight !== null;
	}

	#post(msg: ToWriter, transfer: ArrayBuffer[] = []) {
		this.#worker.postMessage(msg, transfer);
	}

	configure(shafts: ShaftRollupConfig[]) {
		this.#config = shafts;
		this.#post({ type: 'config', shafts });
	}

	submit(batch: WriteBatch) {
		this.#queue.push(batch);
		this.#pump();
	}

	retention(samplesBefore: number, rejectedKeep: number) {
		this.#post({ type: 'retention', samplesBefore, rejectedKeep });
	}

	#pump() {
		if (this.#inflight || !this.#queue.length) {
			if (!this.#inflight && !this.#queue.length) this.#idleWaiters.splice(0).forEach((r) => r());
			return;
		}
		const batch = this.#queue.shift()!;
		this.#inflight = batch;
		// copies, not transfers: a retry after a failure must still have the rows
		this.#post({ type: 'batch', ...batch });
	}

	#onMessage(msg: FromWriter) {
		if (msg.type === 'done' && this.#inflight?.seq === msg.seq) {
			const batch = this.#inflight;
			this.#inflight = null;
			this.onCommitted(msg, batch);
			this.#pump();
		} else if (msg.type === 'failed' && this.#inflight?.seq === msg.seq) {
			console.error(`[aftwater] writing batch ${msg.seq} failed, retrying: ${msg.message}`);
			const batch = this.#inflight;
			this.#inflight = null;
			setTimeout(() => {
				this.#queue.unshift(batch);
				this.#pump();
			}, RETRY_MS).unref();
		}
	}

	/** resolves when everything submitted so far is committed */
	idle(): Promise<void> {
		if (!this.#inflight && !this.#queue.length) return Promise.resolve();
		return new Promise((resolve) => this.#idleWaiters.push(resolve));
	}

	async stop(timeoutMs = 10_000) {
		await Promise.race([this.idle(), new Promise((r) => setTimeout(r, timeoutMs))]);
		this.#stopping = true;
		const stopped = new Promise<void>((resolve) => this.#worker.once('exit', () => resolve()));
		this.#post({ type: 'stop' });
		await Promise.race([stopped, new Promise((r) => setTimeout(r, 2_000))]);
		await this.#worker.terminate();
	}
}
