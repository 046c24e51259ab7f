/**
 * A whole Aftwater in the test process: a fresh SQLite file in a temporary
 * folder, the embedded broker and SMTP sink on free ports, the demo fleet.
 * One per test file (the app context is a process-wide singleton).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startApp } from '$lib/server/app';
import { loadConfig } from '$lib/server/config';
import type { AppContext } from '$lib/server/context';
import { freePort } from './ports';

export interface TestApp {
	ctx: AppContext;
	dir: string;
	dbPath: string;
	mqttPort: number;
	smtpPort: number;
	stop(): Promise<void>;
}

export async function startTestApp(env: Record<string, string> = {}): Promise<TestApp> {
	const dir = mkdtempSync(join(tmpdir(), 'aftwater-test-'));
	const dbPath = join(dir, 'aftwater.db');
	const mqttPort = await freePort();
	const smtpPort = await freePort();
	const config = loadConfig({
		DATABASE_PATH: dbPath,
		DEMO: '1',
		SIMULATOR: 'off',
		MQTT_HOST: '127.0.0.1',
		MQTT_PORT: String(mqttPort),
		SMTP_PORT: String(smtpPort),
		ORIGIN: 'http://localhost:3000',
		INGEST_FLUSH_MS: '20',
		...env
	});
	const ctx = await startApp(config, { quiet: true });
	return {
		ctx,
		dir,
		dbPath,
		mqttPort,
		smtpPort,
		async stop() {
			await ctx.stop();
			rmSync(dir, { recursive: true, force: true });
		}
	};
}
