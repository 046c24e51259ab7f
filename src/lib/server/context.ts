/**
 * The running application: its configuration, database and long-lived parts.
 * Held on globalThis so that `vite dev` re-running `init` after an edit reuses
 * the broker and database instead of binding the ports twice.
 */
import type { Kysely } from 'kysely';
import type { Config } from './config';
import type { Sqlite } from './db/connection';
import type { Database } from './db/schema';
import type { AppLucia } from './auth/lucia';
import type { SignInThrottles } from './auth/throttle';
import type { Services } from './services';
import type { EventBus } from './events';

export interface AppContext {
	config: Config;
	sqlite: Sqlite;
	db: Kysely<Database>;
	lucia: AppLucia;
	throttles: SignInThrottles;
	services: Services;
	events: EventBus;
	startedAt: number;
	stop(): Promise<void>;
}

const KEY = Symbol.for('aftwater.context');
type Holder = { [KEY]?: AppContext; [key: symbol]: unknown };

export function setContext(ctx: AppContext | undefined): void {
	(globalThis as Holder)[KEY] = ctx;
}

export function maybeContext(): AppContext | undefined {
	return (globalThis as Holder)[KEY];
}

export function context(): AppContext {
	const ctx = maybeContext();
	if (!ctx) throw new Error('Aftwater is not started (init has not run)');
	return ctx;
}
