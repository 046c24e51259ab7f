/**
 * Sessions through lucia v3. lucia is no longer developed upstream, so it stays
 * behind this module: routes and hooks use `sessions.*` below, never lucia
 * itself, and it could be replaced without touching them.
 */
import { BetterSqlite3Adapter } from '@lucia-auth/adapter-sqlite';
import { Lucia, TimeSpan } from 'lucia';
import type { Role, UnitSystem } from '$lib/types';
import type { Sqlite } from '../db/connection';

export const SESSION_COOKIE = 'aftwater_session';

export function createLucia(sqlite: Sqlite) {
	const adapter = new BetterSqlite3Adapter(sqlite, { user: 'users', session: 'sessions' });
	return new Lucia(adapter, {
		// Sliding expiry: lucia extends a session used in the second half of its life.
		sessionExpiresIn: new TimeSpan(12, 'h'),
		sessionCookie: {
			name: SESSION_COOKIE,
			expires: true,
			// `secure` is set per request (https or not) where the cookie is written.
			attributes: { sameSite: 'lax' }
		},
		getUserAttributes: (a) => ({
			email: a.email,
			name: a.name,
			role: a.role,
			units: a.units,
			disabled_at: a.disabled_at
		})
	});
}

export type AppLucia = ReturnType<typeof createLucia>;

declare module 'lucia' {
	interface Register {
		Lucia: AppLucia;
		DatabaseUserAttributes: {
			email: string;
			name: string;
			role: Role;
			units: UnitSystem;
			disabled_at: number | null;
		};
	}
}
