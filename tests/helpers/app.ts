/**
 * A whole Aftwater in the test process: a fresh SQLite file in a temporary
 * folder, the embedded broker and SMTP sink on free ports, the demo fleet.
 * One per test file (the app context is a process-wide singleton).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startApp } from '$lib/server/app';
import { loadConfig, type Config } from '$lib/server/config';
import type { AppContext } from '$lib/server/context';
import * as users from '$lib/server/users/repository';
import { freePort } from './ports';

export interface TestApp {
	ctx: AppContext;
	dir: string;
	dbPath: string;
	mqttPort: number;
	smtpPort: number;
	stop(): Promise<void>;
}

/**
 * The configuration `startTestApp` runs with, on the given database file and fresh free ports;
 * for a test that stops an app and starts another on the same file, as after a restart.
 */
export async function testAppConfig(
	dbPath: string,
	env: Record<string, string> = {}
): Promise<Config> {
	return loadConfig({
		DATABASE_PATH: dbPath,
		DEMO: '1',
		SIMULATOR: 'off',
		MQTT_HOST: '127.0.0.1',
		MQTT_PORT: String(await freePort()),
		SMTP_PORT: String(await freePort()),
		ORIGIN: 'http://localhost:3000',
		INGEST_FLUSH_MS: '20',
		...env
	});
}

export async function startTestApp(env: Record<string, string> = {}): Promise<TestApp> {
	const dir = mkdtempSync(join(tmpdir(), 'aftwater-test-'));
	const dbPath = join(dir, 'aftwater.db');
	const config = await testAppConfig(dbPath, env);
	const ctx = await startApp(config, { quiet: true });
	return {
		ctx,
		dir,
		dbPath,
		mqttPort: config.MQTT_PORT,
		smtpPort: config.SMTP_PORT,
		async stop() {
			await ctx.stop();
			rmSync(dir, { recursive: true, force: true });
		}
	};
}

/**
 * Waits until everything published so far is stored and judged by the alarm rules: ingest does
 * not wait on the database, so a check made straight after publishing would race it.
 */
export async function settle(ctx: AppContext): Promise<void> {
	await ctx.services.telemetry!.pipeline.drain();
	await ctx.services.alarms!.store.idle();
}

/** The ids of a shaft and its vessel, by their codes. */
export function shaftIds(ctx: AppContext, vessel: string, shaft: string) {
	return ctx.db
		.selectFrom('shafts')
		.innerJoin('vessels', 'vessels.id', 'shafts.vessel_id')
		.select(['shafts.id as shaftId', 'vessels.id as vesselId'])
		.where('vessels.code', '=', vessel)
		.where('shafts.code', '=', shaft)
		.executeTakeFirstOrThrow();
}

/** A user as the app sees the signed-in user (`locals.user`), by e-mail. */
export async function appUser(ctx: AppContext, email: string): Promise<users.AppUser> {
	const row = await users.findByEmail(ctx.db, email);
	if (!row) throw new Error(`no user ${email}`);
	return users.toAppUser(ctx.db, row);
}
