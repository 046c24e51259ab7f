/**
 * Starting and stopping Aftwater: database (migrated, seeded), sessions, and
 * the long-lived parts. Called from `init` in hooks.server.ts, and directly by
 * integration tests, which start a whole app on a temporary file and ports.
 */
import type { MigrationProvider } from 'kysely';
import type { Config } from './config';
import { createKysely, openSqlite } from './db/connection';
import { bundledMigrations } from './db/bundled-migrations';
import { migrateToLatest } from './db/migrate';
import { createLucia } from './auth/lucia';
import { createSignInThrottles } from './auth/throttle';
import { seedAdmin, seedDemo } from './demo/seed';
import { recoverInterruptedImports } from './history/imports/service';
import { setContext, type AppContext } from './context';
import { startParts } from './parts';
import type { Services, Stoppable } from './services';
import { EventBus } from './events';

export interface StartOptions {
	/** quiet start-up (tests) */
	quiet?: boolean;
	/** where migrations come from; the Vite-bundled ones by default (tsx scripts pass fileMigrations()) */
	migrations?: MigrationProvider;
}

export async function startApp(config: Config, options: StartOptions = {}): Promise<AppContext> {
	const log = options.quiet ? () => {} : (...a: unknown[]) => console.log('[aftwater]', ...a);
	const sqlite = openSqlite(config.DATABASE_PATH);
	const db = createKysely(sqlite);
	const stack: Stoppable[] = [];
	try {
		const applied = await migrateToLatest(db, options.migrations ?? bundledMigrations());
		if (applied.length) log(`migrated: ${applied.join(', ')}`);
		if (config.DEMO) await seedDemo(db, config.DEMO_PASSWORD);
		if ((await seedAdmin(db, config)) === 'created')
			log(`created administrator ${config.ADMIN_EMAIL}`);
		const interrupted = await recoverInterruptedImports(db);
		if (interrupted)
			log(
				`${interrupted} logger import(s) interrupted by the last stop are marked failed, to import again`
			);

		const services: Services = {};
		const ctx: AppContext = {
			config,
			sqlite,
			db,
			lucia: createLucia(sqlite),
			throttles: createSignInThrottles(),
			services,
			events: new EventBus(),
			startedAt: Date.now(),
			async stop() {
				for (const part of [...stack].reverse()) {
					try {
						await part.stop();
					} catch (err) {
						console.error('[aftwater] stopping:', err);
					}
				}
				await db.destroy();
				setContext(undefined);
			}
		};
		setContext(ctx);
		await startParts(ctx, stack);
		return ctx;
	} catch (err) {
		for (const part of [...stack].reverse()) await part.stop();
		await db.destroy();
		setContext(undefined);
		throw err;
	}
}
