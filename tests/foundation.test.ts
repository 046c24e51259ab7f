/**
 * The foundation on a real SQLite file: migrations on a fresh database, demo
 * seeding that changes nothing the second time, no password in clear, and
 * the sign-in throttle.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sql } from 'kysely';
import { createKysely, openSqlite } from '$lib/server/db/connection';
import { migrateToLatest } from '$lib/server/db/migrate';
import { bundledMigrations } from '$lib/server/db/bundled-migrations';
import { seedAdmin, seedDemo } from '$lib/server/demo/seed';
import { loadConfig } from '$lib/server/config';
import { startServer, type TestServer } from './helpers/server';
import { client, DEMO_PASSWORD, signIn, type Client } from './helpers/http';

const dir = mkdtempSync(join(tmpdir(), 'aftwater-foundation-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function snapshot(db: ReturnType<typeof createKysely>) {
	const out: Record<string, unknown[]> = {};
	for (const t of ['users', 'vessels', 'shafts', 'vessel_members', 'gateways', 'audit_log', 'purge_schedules', 'seal_tests', 'bearing_measurements', 'wear_readings', 'wear_limits', 'shrink_fit_plans']) {
		out[t] = (await sql`select * from ${sql.table(t)} order by 1, 2`.execute(db)).rows;
	}
	return out;
}

describe('database', () => {
	it('migrates a fresh file with the server pragmas', async () => {
		const sqlite = openSqlite(join(dir, 'fresh.db'));
		const db = createKysely(sqlite);
		const applied = await migrateToLatest(db, bundledMigrations());
		expect(applied[0]).toBe('20261201_0001_foundation');
		expect(applied).toEqual([...applied].sort());
		expect(await migrateToLatest(db, bundledMigrations())).toEqual([]); // nothing left to do
		expect(sqlite.pragma('journal_mode', { simple: true })).toBe('wal');
		expect(sqlite.pragma('foreign_keys', { simple: true })).toBe(1);
		expect(sqlite.pragma('synchronous', { simple: true })).toBe(1); // NORMAL
		expect(sqlite.pragma('busy_timeout', { simple: true })).toBe(5000);
		const tables = (await sql<{ name: string }>`select name from sqlite_master where type = 'table'`.execute(db)).rows.map((r) => r.name);
		for (const t of ['users', 'sessions', 'vessels', 'shafts', 'vessel_members', 'gateways', 'audit_log', 'samples', 'alarms']) {
			expect(tables).toContain(t);
		}
		expect(sqlite.pragma('integrity_check', { simple: true })).toBe('ok');
		await db.destroy();
	});

	it('seeds the demo fleet idempotently: the second run changes nothing', async () => {
		const sqlite = openSqlite(join(dir, 'seed.db'));
		const db = createKysely(sqlite);
		await migrateToLatest(db, bundledMigrations());
		await seedDemo(db, DEMO_PASSWORD);
		const first = await snapshot(db);
		expect(first.vessels.length).toBeGreaterThanOrEqual(3);
		const diameters = (first.shafts as { diameter_mm: number }[]).map((s) => s.diameter_mm);
		expect(Math.min(...diameters)).toBeLessThanOrEqual(160);
		expect(Math.max(...diameters)).toBeGreaterThanOrEqual(590);
		expect(new Set((first.shafts as { water: string }[]).map((s) => s.water))).toEqual(new Set(['sea', 'fresh']));
		// every demo shaft has its commissioning records
		expect(new Set((first.wear_readings as { shaft_id: number }[]).map((r) => r.shaft_id)).size).toBe(first.shafts.length);
		expect(first.seal_tests).toHaveLength(first.shafts.length);
		await seedDemo(db, DEMO_PASSWORD);
		expect(await snapshot(db)).toEqual(first);
		await db.destroy();
	});

	it('stores no password in clear: argon2id hashes only', async () => {
		const path = join(dir, 'seed.db');
		const sqlite = openSqlite(path);
		const db = createKysely(sqlite);
		const users = await db.selectFrom('users').select('password_hash').execute();
		const gateways = await db.selectFrom('gateways').select('password_hash').execute();
		for (const { password_hash } of [...users, ...gateways]) expect(password_hash).toMatch(/^\$argon2id\$/);
		sqlite.pragma('wal_checkpoint(TRUNCATE)');
		await db.destroy();
		expect(readFileSync(path).includes(Buffer.from(DEMO_PASSWORD))).toBe(false);
	});

	it('outside demo mode, the first administrator comes from ADMIN_EMAIL', async () => {
		const db = createKysely(openSqlite(join(dir, 'admin.db')));
		await migrateToLatest(db, bundledMigrations());
		const config = loadConfig({ ADMIN_EMAIL: 'master@fleet.test', ADMIN_PASSWORD: 'correct horse battery' });
		expect(await seedAdmin(db, config)).toBe('created');
		expect(await seedAdmin(db, config)).toBe('exists');
		const users = await db.selectFrom('users').select(['email', 'role']).execute();
		expect(users).toEqual([{ email: 'master@fleet.test', role: 'admin' }]);
		expect(() => loadConfig({ ADMIN_PASSWORD: 'short' })).toThrow(/ADMIN_PASSWORD/);
		await db.destroy();
	});
});

describe('sign-in over HTTP', () => {
	let server: TestServer;
	let shore: Client; // signed in before the throttling tests lock this address out
	beforeAll(async () => {
		server = await startServer();
		shore = await signIn(server.url, 'shore@demo.test');
	});
	afterAll(() => server?.stop());

	it('sets an httpOnly, SameSite=Lax session cookie, not Secure over plain http', async () => {
		const res = await client(server.url).post('/api/auth/login', { email: 'shore@demo.test', password: DEMO_PASSWORD });
		expect(res.status).toBe(200);
		const cookie = res.headers.getSetCookie().find((c) => c.startsWith('aftwater_session='))!;
		expect(cookie).toMatch(/HttpOnly/i);
		expect(cookie).toMatch(/SameSite=Lax/i);
		expect(cookie).not.toMatch(/Secure/i);
	});

	it('answers the same for a wrong password and an unknown account', async () => {
		const a = await client(server.url).post('/api/auth/login', { email: 'chief@demo.test', password: 'wrong-password' });
		const b = await client(server.url).post('/api/auth/login', { email: 'nobody@demo.test', password: 'wrong-password' });
		expect(a.status).toBe(401);
		expect(b.status).toBe(401);
		expect(await a.json()).toEqual(await b.json());
	});

	it('throttles failed sign-ins per account: even the right password waits', async () => {
		const c = client(server.url);
		for (let i = 0; i < 5; i++) {
			expect((await c.post('/api/auth/login', { email: 'tech@demo.test', password: `guess-${i}` })).status).toBe(401);
		}
		const locked = await c.post('/api/auth/login', { email: 'tech@demo.test', password: DEMO_PASSWORD });
		expect(locked.status).toBe(429);
		expect(Number(locked.headers.get('retry-after'))).toBeGreaterThan(0);
		expect((await locked.json()).error.code).toBe('throttled');
		// another account from the same address is not locked by it
		expect((await c.post('/api/auth/login', { email: 'fleet@demo.test', password: DEMO_PASSWORD })).status).toBe(200);
	});

	it('throttles per client address across accounts', async () => {
		const c = client(server.url);
		let last = 0;
		for (let i = 0; i < 25; i++) {
			last = (await c.post('/api/auth/login', { email: `probe${i}@demo.test`, password: 'x' })).status;
		}
		expect(last).toBe(429);
	});

	it('bad bodies get clear JSON errors', async () => {
		const c = client(server.url);
		const notJson = await c.request('POST', '/api/auth/login', '<email/>', { 'content-type': 'application/xml' });
		expect(notJson.status).toBe(415);
		const broken = await c.request('POST', '/api/auth/login', '{"email":', { 'content-type': 'application/json' });
		expect(broken.status).toBe(400);
		expect((await broken.json()).error.code).toBe('bad_json');
		const missing = await c.post('/api/auth/login', { email: 'x@y.z' });
		expect(missing.status).toBe(422);
		expect((await missing.json()).error.fields).toHaveProperty('password');
	});

	it('health answers without sign-in', async () => {
		const res = await fetch(`${server.url}/api/health`);
		expect(res.status).toBe(200);
		expect((await res.json()).ingest).toMatchObject({ received_total: expect.any(Number), stored_total: expect.any(Number), rejected_total: expect.any(Number) });
	});

	it('the API answers in JSON for paths and methods it does not have', async () => {
		const c = shore;
		for (const path of ['/api/no-such-thing', '/api/vessels/1e400', '/api/vessels/-1', '/api/vessels/0x10']) {
			const res = await c.get(path);
			expect(res.status, path).toBe(404);
			expect((await res.json()).error.code).toBe('not_found');
		}
		const wrong = await c.request('DELETE', '/api/health');
		expect(wrong.status).toBe(405);
		expect((await wrong.json()).error.code).toBe('method_not_allowed');
		expect(wrong.headers.get('allow')).toContain('GET');
	});
});
