/**
 * The writer thread: it owns the writing SQLite connection, so the main
 * thread's event loop never blocks on inserts (PERFORMANCE.md: 30 k msg/s
 * sustained with writes in a worker, half that on the main thread).
 *
 * This module is both sides: imported on the main thread it exports
 * spawnWriterThread(); loaded as a worker (workerData.role) it runs the
 * writer. In the built server it is a bundled chunk and runs as is; from
 * TypeScript source (vite dev, Vitest, tsx scripts) the worker gets tsx.
 */
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import { openSqlite } from '../db/connection';
import type { FromWriter, ToWriter } from './batch';
import { TelemetryWriter } from './telemetry-writer';

const ROLE = 'aftwater-telemetry-writer';

if (!isMainThread && workerData?.role === ROLE) runWriter(workerData.databasePath as string);

function runWriter(databasePath: string) {
	const port = parentPort!;
	const send = (msg: FromWriter) => port.postMessage(msg);
	const sqlite = openSqlite(databasePath);
	const writer = new TelemetryWriter(sqlite);
	port.on('message', (msg: ToWriter) => {
		switch (msg.type) {
			case 'config':
				writer.configure(msg.shafts);
				break;
			case 'batch':
				try {
					send({ type: 'done', ...writer.write(msg) });
				} catch (err) {
					send({ type: 'failed', seq: msg.seq, message: String(err) });
				}
				break;
			case 'retention':
				try {
					send({ type: 'retention-done', deleted: writer.retention(msg.samplesBefore, msg.rejectedKeep) });
				} catch (err) {
					console.error('[aftwater] retention failed:', err);
				}
				break;
			case 'stop':
				sqlite.close();
				send({ type: 'stopped' });
				port.close();
				break;
		}
	});
	send({ type: 'ready' });
}

export function spawnWriterThread(databasePath: string): Worker {
	const self = new URL(import.meta.url);
	const workerData = { role: ROLE, databasePath };
	if (!self.pathname.endsWith('.ts')) return new Worker(self, { workerData });
	// From source: register tsx's loader inside the worker, then load this module.
	const boot = `import('tsx/esm/api').then((tsx) => { tsx.register(); return import(${JSON.stringify(self.href)}); })`;
	return new Worker(boot, { eval: true, workerData });
}
