/**
 * Users and settings through the built app's form actions: an invitation e-mailed to a
 * user made without a password, disabling that signs out at once, units that persist, a
 * password change that signs out every other session, and API tokens shown once that
 * work as Bearer until revoked.
 */
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from './helpers/server';
import { client, postAction, signIn, type Client, type FormFields } from './helpers/http';
import { waitFor } from './helpers/ports';
import { vesselIds } from './helpers/sqlite';

let server: TestServer;
let admin: Client;
let db: Database.Database;
let ids: Record<string, number>;

const act = (c: Client, path: string, fields?: FormFields) =>
	postAction(c, server.env.ORIGIN, path, fields);

const userRow = (email: string) =>
	db.prepare('select * from users where email = ?').get(email) as Record<string, any> | undefined;

/** Messages the local SMTP sink received for an address. */
const sinkFor = (address: string) =>
	(db.prepare('select * from mail_sink order by id').all() as Record<string, any>[]).filter((m) =>
		(JSON.parse(m.envelope_to) as string[]).includes(address)
	);

/** A user with a password, made through the admin page. */
async function makeUser(
	email: string,
	password: string,
	role = 'shore_office',
	vessels: number[] = []
) {
	const answer = await act(admin, '/admin/users?/create', {
		email,
		name: email.split('@')[0],
		role,
		vessel_ids: vessels.map(String),
		password
	});
	expect(answer.type, JSON.stringify(answer.data)).toBe('success');
	return userRow(email)!;
}

beforeAll(async () => {
	server = await startServer();
	db = new Database(server.dbPath, { readonly: true, fileMustExist: true });
	admin = await signIn(server.url, 'admin@demo.test');
	ids = vesselIds(db);
});
afterAll(async () => {
	db?.close();
	await server?.stop();
});

describe('users', () => {
	it('a new user without a password is e-mailed an invitation', async () => {
		const answer = await act(admin, '/admin/users?/create', {
			email: 'Brenna.Scaife@Example.org',
			name: 'Brenna Scaife',
			role: 'technician',
			vessel_ids: [String(ids['corrin-bay']), String(ids['hallow-tern'])]
		});
		expect(answer).toMatchObject({
			type: 'success',
			data: { created: { email: 'brenna.scaife@example.org', invited: true } }
		});
		const row = userRow('brenna.scaife@example.org')!;
		expect(row.password_hash).toBeNull();
		const members = db
			.prepare('select vessel_id from vessel_members where user_id = ? order by vessel_id')
			.all(row.id)
			.map((m) => (m as { vessel_id: number }).vessel_id);
		expect(members).toEqual([ids['corrin-bay'], ids['hallow-tern']].sort((a, b) => a - b));
		const [mail] = await waitFor(
			async () => {
				const got = sinkFor('brenna.scaife@example.org');
				return got.length ? got : undefined;
			},
			{ timeoutMs: 30_000, what: 'the invitation in the sink' }
		);
		expect(mail.subject).toBe('Your Aftwater account: set your password');
		expect(mail.text).toMatch(/\/account\/invite\/[A-Za-z0-9_-]+/);
		const list = await (await admin.get('/admin/users')).text();
		expect(list).toContain('brenna.scaife@example.org');
		expect(list).toContain('Not set (invited)');
	});

	it('refuses an on-board role without a vessel, a short password and a taken e-mail', async () => {
		const users = db.prepare('select count(*) as n from users').get() as { n: number };
		const onboard = await act(admin, '/admin/users?/create', {
			email: 'no.vessel@example.org',
			name: 'No Vessel',
			role: 'chief_engineer'
		});
		expect(onboard.failure).toBe(400);
		expect(onboard.data!.errors.vessel_ids).toMatch(/on-board role needs at least one vessel/);
		expect(onboard.data!.values).toEqual({
			email: 'no.vessel@example.org',
			name: 'No Vessel',
			role: 'chief_engineer'
		});

		const short = await act(admin, '/admin/users?/create', {
			email: 'short.pw@example.org',
			name: 'Short Password',
			role: 'shore_office',
			password: 'eleven-char'
		});
		expect(short.data!.errors.password).toBe('at least 12 characters');
		// the typed password is never sent back to the page
		expect(JSON.stringify(short.data)).not.toContain('eleven-char');

		const taken = await act(admin, '/admin/users?/create', {
			email: 'chief@demo.test',
			name: 'Impostor',
			role: 'shore_office'
		});
		expect(taken.failure).toBe(409);
		expect(taken.data!.errors.email).toMatch(/already has this e-mail/);
		expect(db.prepare('select count(*) as n from users').get()).toEqual(users);
	});

	it('edits the role and vessels, and keeps an on-board role on at least one vessel', async () => {
		const user = await makeUser('deck.move@example.org', 'slipway-lantern-9', 'shore_office');
		const empty = await act(admin, `/admin/users/${user.id}?/update`, {
			name: 'Deck Move',
			role: 'technician'
		});
		expect(empty.failure).toBe(400);
		expect(empty.data!.errors.vessel_ids).toMatch(/at least one vessel/);
		expect(userRow('deck.move@example.org')!.role).toBe('shore_office');

		const answer = await act(admin, `/admin/users/${user.id}?/update`, {
			name: 'Deck Move',
			role: 'technician',
			vessel_ids: [String(ids['lakeline-wren'])]
		});
		expect(answer.type).toBe('success');
		expect(userRow('deck.move@example.org')).toMatchObject({
			role: 'technician',
			name: 'Deck Move'
		});
		const me = await (
			await signIn(server.url, 'deck.move@example.org', 'slipway-lantern-9').then((c) =>
				c.get('/api/me')
			)
		).json();
		expect(me.user).toMatchObject({ role: 'technician', vessel_ids: [ids['lakeline-wren']] });
	});

	it('disabling signs the user out at their next request; enabling lets them back in', async () => {
		const user = await makeUser('off.watch@example.org', 'binnacle-mooring-4');
		const them = await signIn(server.url, 'off.watch@example.org', 'binnacle-mooring-4');
		expect((await them.get('/api/me')).status).toBe(200);

		const answer = await act(admin, `/admin/users/${user.id}?/disable`);
		expect(answer.type).toBe('success');
		expect(userRow('off.watch@example.org')!.disabled_at).toBeGreaterThan(0);
		expect((await them.get('/api/me')).status).toBe(401);
		const page = await them.get('/settings');
		expect(page.status).toBe(303);
		expect(page.headers.get('location')).toMatch(/^\/login/);
		await expect(
			signIn(server.url, 'off.watch@example.org', 'binnacle-mooring-4')
		).rejects.toThrow();

		expect((await act(admin, `/admin/users/${user.id}?/enable`)).type).toBe('success');
		const again = await signIn(server.url, 'off.watch@example.org', 'binnacle-mooring-4');
		expect((await again.get('/api/me')).status).toBe(200);
	});

	it('an admin cannot disable themselves', async () => {
		const self = userRow('admin@demo.test')!;
		const answer = await act(admin, `/admin/users/${self.id}?/disable`);
		expect(answer.failure).toBe(409);
		expect(userRow('admin@demo.test')!.disabled_at).toBeNull();
	});

	it('sends a password-reset link to a user with a password', async () => {
		const user = await makeUser('reset.me@example.org', 'capstan-fathom-22');
		const answer = await act(admin, `/admin/users/${user.id}?/sendLink`);
		expect(answer).toMatchObject({ type: 'success', data: { scope: 'link' } });
		expect(answer.data!.message).toMatch(/password-reset link/);
		const [mail] = await waitFor(
			async () => {
				const got = sinkFor('reset.me@example.org');
				return got.length ? got : undefined;
			},
			{ timeoutMs: 30_000, what: 'the reset link in the sink' }
		);
		expect(mail.text).toMatch(/\/account\/reset\/[A-Za-z0-9_-]+/);
	});
});

describe('settings', () => {
	it('shows the role and vessels of the signed-in user', async () => {
		const chief = await signIn(server.url, 'chief@demo.test');
		const html = await (await chief.get('/settings')).text();
		// the text of an element, without Svelte's hydration comments
		const textOf = (testid: string) =>
			html
				.match(new RegExp(`data-testid="${testid}"[^>]*>([\\s\\S]*?)</dd>`))?.[1]
				.replace(/<!--.*?-->/g, '')
				.trim();
		expect(textOf('my-role')).toBe('Chief engineer');
		expect(textOf('my-vessels')).toBe('Corrin Bay, Skerry Lark');
		expect(html).toContain('href="/settings/notifications"');
	});

	it('a change of units persists', async () => {
		await makeUser('units.user@example.org', 'gudgeon-pintle-31');
		const me = await signIn(server.url, 'units.user@example.org', 'gudgeon-pintle-31');
		expect(userRow('units.user@example.org')!.units).toBe('metric');
		const answer = await act(me, '/settings?/units', { units: 'us' });
		expect(answer).toMatchObject({ type: 'success', data: { scope: 'units', saved: true } });
		expect(userRow('units.user@example.org')!.units).toBe('us');
		expect((await (await me.get('/api/me')).json()).user.units).toBe('us');
		// and in a new session
		const later = await signIn(server.url, 'units.user@example.org', 'gudgeon-pintle-31');
		expect((await (await later.get('/api/me')).json()).user.units).toBe('us');

		const bad = await act(me, '/settings?/units', { units: 'imperial' });
		expect(bad.failure).toBe(400);
		expect(userRow('units.user@example.org')!.units).toBe('us');
	});

	it('a password change signs out every other session and keeps this one', async () => {
		await makeUser('new.pw@example.org', 'sternpost-rudder-5');
		const here = await signIn(server.url, 'new.pw@example.org', 'sternpost-rudder-5');
		const elsewhere = await signIn(server.url, 'new.pw@example.org', 'sternpost-rudder-5');

		const wrong = await act(here, '/settings?/password', {
			current_password: 'not-the-password',
			new_password: 'propeller-boss-88',
			new_password_again: 'propeller-boss-88'
		});
		expect(wrong.failure).toBe(422);
		expect(wrong.data!.errors.current_password).toBe('not your current password');
		const mismatch = await act(here, '/settings?/password', {
			current_password: 'sternpost-rudder-5',
			new_password: 'propeller-boss-88',
			new_password_again: 'propeller-boss-89'
		});
		expect(mismatch.data!.errors.new_password_again).toMatch(/not the same/);
		expect((await elsewhere.get('/api/me')).status).toBe(200);

		const cookieBefore = here.cookie;
		const answer = await act(here, '/settings?/password', {
			current_password: 'sternpost-rudder-5',
			new_password: 'propeller-boss-88',
			new_password_again: 'propeller-boss-88'
		});
		expect(answer).toMatchObject({ type: 'success', data: { scope: 'password', saved: true } });
		expect(here.cookie).not.toBe(cookieBefore); // a fresh session for this browser
		expect((await here.get('/api/me')).status).toBe(200);
		expect((await elsewhere.get('/api/me')).status).toBe(401);
		// the old cookie is dead too
		expect((await client(server.url, { cookie: cookieBefore }).get('/api/me')).status).toBe(401);
		await expect(signIn(server.url, 'new.pw@example.org', 'sternpost-rudder-5')).rejects.toThrow();
		await signIn(server.url, 'new.pw@example.org', 'propeller-boss-88');
	});

	it('an API token is shown once, works as Bearer on /api/me, and stops when revoked', async () => {
		await makeUser('integrator@example.org', 'hawsepipe-chain-12');
		const me = await signIn(server.url, 'integrator@example.org', 'hawsepipe-chain-12');
		const answer = await act(me, '/settings?/createToken', { name: 'fleet dashboard' });
		expect(answer.type).toBe('success');
		expect(answer.headers.get('cache-control')).toBe('no-store');
		const { id, token } = answer.data!.token as { id: number; token: string };
		expect(token).toMatch(/^awt_/);

		const bearer = client(server.url, { token });
		const res = await bearer.get('/api/me');
		expect(res.status).toBe(200);
		expect((await res.json()).user.email).toBe('integrator@example.org');
		// a token cannot mint more tokens (a stolen one would outlive its revocation)
		const minted = await bearer.post('/api/me/tokens', { name: 'another' });
		expect(minted.status).toBe(403);
		// only a hash is kept, and the settings page lists it by name without the token
		const stored = db.prepare('select token_hash from api_tokens where id = ?').get(id) as {
			token_hash: string;
		};
		expect(stored.token_hash).not.toContain(token);
		const page = await (await me.get('/settings')).text();
		expect(page).toContain('fleet dashboard');
		expect(page).not.toContain(token);

		const other = await signIn(server.url, 'chief@demo.test');
		expect((await act(other, '/settings?/revokeToken', { id: String(id) })).failure).toBe(404);
		expect((await bearer.get('/api/me')).status).toBe(200);

		const revoked = await act(me, '/settings?/revokeToken', { id: String(id) });
		expect(revoked).toMatchObject({ type: 'success', data: { scope: 'tokens' } });
		expect((await bearer.get('/api/me')).status).toBe(401);
	});

	it('signed out, settings sends the browser to sign in', async () => {
		const res = await client(server.url).get('/settings');
		expect(res.status).toBe(303);
		expect(res.headers.get('location')).toBe('/login?next=%2Fsettings');
	});
});
