/**
 * Starting and steering the bench's publishers: `count` child processes
 * (forked with the same tsx loader) or worker threads, the connections split
 * evenly between them. Either way they run outside the server's event loop.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { Worker } from 'node:worker_threads';
import {
	PUBLISHER_ROLE,
	type ConnSpec,
	type FromPublisher,
	type InitMsg,
	type PublisherResult,
	type ToPublisher
} from './protocol';

export type PublisherKind = 'process' | 'thread';

const MODULE = new URL('./publisher.ts', import.meta.url);

interface Handle {
	send(msg: ToPublisher): void;
	on(fn: (msg: FromPublisher) => void): void;
	kill(): void;
	exited: Promise<void>;
}

function spawnProcess(): Handle {
	// the parent runs under tsx, so process.execArgv carries its loader into the child
	const child: ChildProcess = fork(MODULE.pathname, [PUBLISHER_ROLE], {
		serialization: 'advanced',
		stdio: ['ignore', 'inherit', 'inherit', 'ipc']
	});
	const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
	return {
		send: (msg) => child.send(msg),
		on: (fn) => child.on('message', (m) => fn(m as FromPublisher)),
		kill: () => child.kill('SIGKILL'),
		exited
	};
}

function spawnThread(): Handle {
	const boot = `import('tsx/esm/api').then((tsx) => { tsx.register(); return import(${JSON.stringify(MODULE.href)}); })`;
	const worker = new Worker(boot, { eval: true, workerData: { role: PUBLISHER_ROLE } });
	const exited = new Promise<void>((resolve) => worker.once('exit', () => resolve()));
	return {
		send: (msg) => worker.postMessage(msg),
		on: (fn) => worker.on('message', fn),
		kill: () => void worker.terminate(),
		exited
	};
}

export class Publishers {
	#handles: Handle[];
	#waiters: ((msg: FromPublisher, i: number) => void)[] = [];
	#granted: number[];

	constructor(kind: PublisherKind, count: number) {
		this.#handles = Array.from({ length: count }, () =>
			kind === 'process' ? spawnProcess() : spawnThread()
		);
		this.#granted = this.#handles.map(() => 0);
		this.#handles.forEach((h, i) => h.on((msg) => this.#waiters.forEach((w) => w(msg, i))));
	}

	get count() {
		return this.#handles.length;
	}

	#collect<T extends FromPublisher['type']>(
		type: T,
		timeoutMs: number
	): Promise<Extract<FromPublisher, { type: T }>[]> {
		return new Promise((resolve, reject) => {
			const got: Extract<FromPublisher, { type: T }>[] = [];
			let n = 0;
			const timer = setTimeout(
				() => reject(new Error(`publishers: no '${type}' after ${timeoutMs} ms`)),
				timeoutMs
			);
			const waiter = (msg: FromPublisher, i: number) => {
				if (msg.type !== type) return;
				got[i] = msg as Extract<FromPublisher, { type: T }>;
				if (++n === this.#handles.length) {
					clearTimeout(timer);
					this.#waiters = this.#waiters.filter((w) => w !== waiter);
					resolve(got);
				}
			};
			this.#waiters.push(waiter);
		});
	}

	/** Connects every gateway; resolves when all publishers have tried. */
	async connect(init: Omit<InitMsg, 'type' | 'conns'>, conns: ConnSpec[]) {
		const ready = this.#collect('ready', 120_000);
		this.#handles.forEach((h, i) =>
			h.send({
				type: 'init',
				...init,
				conns: conns.filter((_, j) => j % this.#handles.length === i)
			})
		);
		const replies = await ready;
		return {
			connected: replies.reduce((a, r) => a + r.connected, 0),
			failed: replies.flatMap((r) => r.failed)
		};
	}

	/** Starts publishing; resolves with each publisher's result when they have finished. */
	go(timeoutMs: number): Promise<PublisherResult[]> {
		const done = this.#collect('done', timeoutMs);
		for (const h of this.#handles) h.send({ type: 'go' });
		return done;
	}

	/** QoS 0 credit: lets the publishers send `more` messages beyond what they were allowed, shared evenly. */
	grant(more: number) {
		const each = Math.floor(more / this.#handles.length);
		if (each <= 0) return;
		this.#handles.forEach((h, i) => h.send({ type: 'allow', total: (this.#granted[i] += each) }));
	}

	get granted() {
		return this.#granted.reduce((a, b) => a + b, 0);
	}

	async close() {
		const closed = this.#collect('closed', 10_000).catch(() => null);
		for (const h of this.#handles) h.send({ type: 'close' });
		await closed;
		const exited = Promise.all(this.#handles.map((h) => h.exited));
		const timer = setTimeout(() => this.#handles.forEach((h) => h.kill()), 5_000);
		await exited;
		clearTimeout(timer);
	}

	kill() {
		for (const h of this.#handles) h.kill();
	}
}
