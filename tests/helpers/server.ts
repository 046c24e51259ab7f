/**
 * The built app (`node build`) in a child process, as a user runs it, on a
 * fresh SQLite file and free ports. Tests that go through HTTP use this; run
 * `vite build` first (the test command does).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { freePort, waitFor } from './ports';

export interface TestServer {
	url: string;
	dir: string;
	dbPath: string;
	mqttPort: number;
	smtpPort: number;
	env: Record<string, string>;
	output: () => string;
	/** the server process id (for memory readings in benchmarks) */
	pid: () => number | undefined;
	/** stop (SIGTERM), optionally keeping the database folder for a restart */
	stop(options?: { keepData?: boolean; signal?: NodeJS.Signals }): Promise<void>;
	/** start again on the same ports and database */
	restart(): Promise<void>;
}

const ROOT = resolve(import.meta.dirname, '../..');

export async function startServer(env: Record<string, string> = {}): Promise<TestServer> {
	if (!existsSync(join(ROOT, 'build/index.js'))) throw new Error('run `vite build` before the HTTP tests');
	const dir = env.DATABASE_PATH ? resolve(env.DATABASE_PATH, '..') : mkdtempSync(join(tmpdir(), 'aftwater-srv-'));
	const port = await freePort();
	const fullEnv: Record<string, string> = {
		PATH: process.env.PATH ?? '',
		HOME: process.env.HOME ?? '/tmp',
		PORT: String(port),
		HOST: '127.0.0.1',
		// the same host the tests browse, or SvelteKit refuses their form posts as cross-site
		ORIGIN: `http://127.0.0.1:${port}`,
		DATABASE_PATH: join(dir, 'aftwater.db'),
		DEMO: '1',
		SIMULATOR: 'off',
		MQTT_HOST: '127.0.0.1',
		MQTT_PORT: String(await freePort()),
		SMTP_PORT: String(await freePort()),
		// as `npm start` sets it: logger uploads are larger than adapter-node's 512 kB default
		BODY_SIZE_LIMIT: '25M',
		...env
	};
	let child: ChildProcess;
	let log = '';

	async function launch() {
		log = '';
		child = spawn(process.execPath, ['build/index.js'], { cwd: ROOT, env: fullEnv, stdio: ['ignore', 'pipe', 'pipe'] });
		child.stdout!.on('data', (d) => (log += d));
		child.stderr!.on('data', (d) => (log += d));
		let exited = false;
		child.once('exit', () => (exited = true));
		await waitFor(
			async () => {
				if (exited) throw new Error(`server exited:\n${log}`);
				const res = await fetch(`http://127.0.0.1:${port}/api/health`).catch(() => null);
				return res?.ok;
			},
			{ timeoutMs: 30_000, intervalMs: 100, what: 'the server to answer /api/health' }
		);
	}

	async function halt(signal: NodeJS.Signals = 'SIGTERM') {
		if (!child || child.exitCode !== null || child.signalCode !== null) return;
		const gone = new Promise((r) => child.once('exit', r));
		child.kill(signal);
		const timer = setTimeout(() => child.kill('SIGKILL'), 10_000);
		await gone;
		clearTimeout(timer);
	}

	await launch();
	return {
		url: `http://127.0.0.1:${port}`,
		dir,
		dbPath: fullEnv.DATABASE_PATH,
		mqttPort: Number(fullEnv.MQTT_PORT),
		smtpPort: Number(fullEnv.SMTP_PORT),
		env: fullEnv,
		output: () => log,
		pid: () => child.pid,
		async stop(options = {}) {
			await halt(options.signal);
			if (!options.keepData) rmSync(dir, { recursive: true, force: true });
		},
		async restart() {
			await halt();
			await launch();
		}
	};
}
