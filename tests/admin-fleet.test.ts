/**
 * Fleet configuration, gateway credentials, the audit log and ingest health, through the
 * built app's form actions and pages as a browser would use them: SI stored whatever units
 * the admin types in, duplicate codes refused with a field error, a gateway password shown
 * once and kept only as an argon2 hash, and every admin page and action closed to other roles.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from './helpers/server';
import { client, postAction, signIn, type Client, type FormFields } from './helpers/http';
import { connectGateway, telemetry } from './helpers/gateway';
import { waitFor } from './helpers/ports';
import { vesselIds } from './helpers/sqlite';

let server: TestServer;
let admin: Client;
let usAdmin: Client; // an administrator who works in US customary units
let db: Database.Database;
let ids: Record<string, number>;

const act = (c: Client, path: string, fields?: FormFields) =>
	postAction(c, server.env.ORIGIN, path, fields);

const vesselRow = (code: string) =>
	db.prepare('select * from vessels where code = ?').get(code) as Record<string, any> | undefined;
const shaftRow = (vesselId: number, code: string) =>
	db.prepare('select * from shafts where vessel_id = ? and code = ?').get(vesselId, code) as
		Record<string, any> | undefined;
const count = (sql: string, ...args: unknown[]) =>
	(db.prepare(sql).get(...args) as { n: number }).n;

beforeAll(async () => {
	server = await startServer();
	db = new Database(server.dbPath, { readonly: true, fileMustExist: true });
	admin = await signIn(server.url, 'admin@demo.test');
	const created = await admin.post('/api/users', {
		email: 'yard.admin@example.org',
		name: 'Ossian Varga',
		role: 'admin',
		password: 'keel-block-harbour-7'
	});
	expect(created.status).toBe(201);
	usAdmin = await signIn(server.url, 'yard.admin@example.org', 'keel-block-harbour-7');
	expect((await usAdmin.put('/api/me/preferences', { units: 'us' })).status).toBe(200);
	ids = vesselIds(db);
});
afterAll(async () => {
	db?.close();
	await server?.stop();
});

describe('vessels and shafts', () => {
	it('an admin creates a vessel and is taken to it; the vessel is stored as typed', async () => {
		const answer = await act(admin, '/admin/fleet?/createVessel', {
			code: 'north-gale',
			name: 'North Gale',
			kind: 'Research vessel, twin screw',
			time_zone: 'Europe/Oslo',
			salinity_psu: '34,5'
		});
		expect(answer.type).toBe('redirect');
		const row = vesselRow('north-gale');
		expect(row).toMatchObject({
			name: 'North Gale',
			kind: 'Research vessel, twin screw',
			time_zone: 'Europe/Oslo',
			salinity_psu: 34.5
		});
		expect(answer.location).toBe(`/admin/fleet/${row!.id}?created=1`);
		ids['north-gale'] = row!.id;
		const page = await admin.get(`/admin/fleet/${row!.id}`);
		expect(page.status).toBe(200);
		expect(await page.text()).toContain('North Gale');
	});

	it('a metric admin adds a shaft: millimetres, metres and L/min per mm are stored as typed', async () => {
		const answer = await act(admin, `/admin/fleet/${ids['north-gale']}?/createShaft`, {
			units: 'metric',
			code: 'port',
			name: 'Port shaft',
			position: 'port',
			water: 'sea',
			diameter: '420',
			centreline_depth: '4.2',
			min_flow_factor: '0.15'
		});
		expect(answer).toMatchObject({ type: 'success', data: { scope: 'new-shaft', saved: true } });
		const row = shaftRow(ids['north-gale'], 'port')!;
		expect(row).toMatchObject({
			name: 'Port shaft',
			position: 'port',
			water: 'sea',
			diameter_mm: 420,
			centreline_depth_m: 4.2,
			min_flow_factor_lpm_per_mm: 0.15
		});
		const api = await (await admin.get(`/api/shafts/${row.id}`)).json();
		// 0.15 L/min per mm × 420 mm
		expect(api.shaft.min_flow_lpm).toBeCloseTo(63, 9);
	});

	it('a US-units admin types inches and feet; millimetres and metres are stored', async () => {
		const answer = await act(usAdmin, `/admin/fleet/${ids['north-gale']}?/createShaft`, {
			units: 'us',
			code: 'stbd',
			name: 'Starboard shaft',
			position: 'starboard',
			water: 'sea',
			diameter: '16.5',
			centreline_depth: '10',
			min_flow_factor: '1'
		});
		expect(answer.type).toBe('success');
		const row = shaftRow(ids['north-gale'], 'stbd')!;
		// NIST SP 811: 1 in = 25.4 mm and 1 ft = 0.3048 m exactly
		expect(row.diameter_mm).toBe(419.1);
		expect(row.centreline_depth_m).toBe(3.048);
		// 1 US gal/min per inch = 3.785411784 L / 25.4 mm = 0.14903196 L/min per mm
		expect(row.min_flow_factor_lpm_per_mm).toBeCloseTo(0.14903196, 5);
		// and the vessel page gives it back in inches
		const html = await (await usAdmin.get(`/admin/fleet/${ids['north-gale']}`)).text();
		expect(html).toContain('16.50 in');
	});

	it('an edit that leaves a figure as shown keeps the stored SI exactly', async () => {
		const before = shaftRow(ids['north-gale'], 'port')!;
		// 420 mm is shown to a US user as 16.535 in, which would read back as 419.99 mm
		const answer = await act(usAdmin, `/admin/fleet/${ids['north-gale']}?/updateShaft`, {
			units: 'us',
			shaft_id: String(before.id),
			name: 'Port shaft (aft bearing)',
			position: 'port',
			water: 'sea',
			diameter: '16.535',
			centreline_depth: '13.78',
			min_flow_factor: '1.0065'
		});
		expect(answer).toMatchObject({ type: 'success', data: { scope: `shaft-${before.id}` } });
		const after = shaftRow(ids['north-gale'], 'port')!;
		expect(after.name).toBe('Port shaft (aft bearing)');
		expect(after.diameter_mm).toBe(420);
		expect(after.centreline_depth_m).toBe(4.2);
		expect(after.min_flow_factor_lpm_per_mm).toBe(0.15);
		const audit = db
			.prepare("select details from audit_log where action = 'shaft.update' and entity_id = ?")
			.get(String(before.id)) as { details: string };
		expect(Object.keys(JSON.parse(audit.details))).toEqual(['name']);
	});

	it('a duplicate vessel code is a field error and creates nothing', async () => {
		const vessels = count('select count(*) as n from vessels');
		const answer = await act(admin, '/admin/fleet?/createVessel', {
			code: 'north-gale',
			name: 'Another North Gale',
			time_zone: 'UTC'
		});
		expect(answer.type).toBe('failure');
		expect(answer.failure).toBe(409);
		expect(answer.data!.errors.code).toMatch(/already has the code “north-gale”/);
		expect(answer.data!.values.name).toBe('Another North Gale');
		expect(count('select count(*) as n from vessels')).toBe(vessels);
		expect(vesselRow('north-gale')!.name).toBe('North Gale');
	});

	it('a duplicate shaft code on the same vessel is a field error and creates nothing', async () => {
		const shafts = count('select count(*) as n from shafts');
		const answer = await act(admin, `/admin/fleet/${ids['north-gale']}?/createShaft`, {
			units: 'metric',
			code: 'port',
			name: 'Second port shaft',
			diameter: '300',
			centreline_depth: '3'
		});
		expect(answer.failure).toBe(409);
		expect(answer.data!.errors.code).toMatch(/already has a shaft with the code “port”/);
		expect(count('select count(*) as n from shafts')).toBe(shafts);
	});

	it('invalid figures are refused field by field, in the units they were typed in', async () => {
		const answer = await act(usAdmin, `/admin/fleet/${ids['north-gale']}?/createShaft`, {
			units: 'us',
			code: 'Centre Shaft',
			name: '',
			diameter: '0.5',
			centreline_depth: 'deep'
		});
		expect(answer.failure).toBe(400);
		const errors = answer.data!.errors;
		expect(errors.code).toMatch(/lowercase letters/);
		expect(errors.name).toBe('required');
		// 20 mm is 0.79 in
		expect(errors.diameter_mm).toMatch(/above 0\.79 in/);
		expect(errors.centreline_depth_m).toBe('a number in ft');
		expect(answer.data!.values.diameter).toBe('0.5');
		expect(count("select count(*) as n from shafts where code = 'centre shaft'")).toBe(0);
	});

	it('the vessel edit keeps the code and changes the rest', async () => {
		const answer = await act(admin, `/admin/fleet/${ids['north-gale']}?/updateVessel`, {
			code: 'renamed',
			name: 'North Gale II',
			kind: '',
			time_zone: 'Atlantic/Reykjavik',
			salinity_psu: ''
		});
		expect(answer).toMatchObject({ type: 'success', data: { scope: 'vessel', saved: true } });
		expect(vesselRow('renamed')).toBeUndefined();
		expect(vesselRow('north-gale')).toMatchObject({
			name: 'North Gale II',
			kind: null,
			time_zone: 'Atlantic/Reykjavik',
			salinity_psu: null
		});
	});
});

describe('PATCH /api/vessels/{id} and /api/shafts/{id}', () => {
	it('an empty change answers the item unchanged; a misspelt field is named (422), and nothing is changed', async () => {
		const vessel = ids['skerry-lark'];
		const shaft = shaftRow(vessel, 'port')!;
		for (const path of [`/api/vessels/${vessel}`, `/api/shafts/${shaft.id}`]) {
			const empty = await admin.patch(path, {});
			expect(empty.status).toBe(200);
			const typo = await admin.patch(path, { nam: 'Typo' });
			expect(typo.status).toBe(422);
			expect(JSON.stringify((await typo.json()).error)).toContain('nam');
		}
		expect(vesselRow('skerry-lark')!.name).not.toBe('Typo');
		expect(shaftRow(vessel, 'port')!.name).toBe(shaft.name);
	});

	it('a corrected diameter changes the minimum, and the change is kept with who made it', async () => {
		const vessel = ids['skerry-lark'];
		const shaft = shaftRow(vessel, 'stbd')!;
		const res = await admin.patch(`/api/shafts/${shaft.id}`, { diameter_mm: shaft.diameter_mm + 10 });
		expect(res.status).toBe(200);
		// 0.15 L/min per mm (the default factor) × 10 mm more = 1.5 L/min more
		expect((await res.json()).shaft.min_flow_lpm).toBeCloseTo(0.15 * (shaft.diameter_mm + 10), 9);
		const change = db.prepare('select * from shaft_minimum_changes where shaft_id = ?').get(shaft.id) as Record<string, any>;
		expect(change).toMatchObject({ changed_by: 'admin@demo.test' });
		expect(change.to_lpm - change.from_lpm).toBeCloseTo(1.5, 9);
	});
});

describe('gateway credentials', () => {
	let gateway: MqttClient | undefined;
	afterAll(() => {
		gateway?.end(true);
	});

	it('are issued only when confirmed', async () => {
		const answer = await act(admin, `/admin/fleet/${ids['north-gale']}?/rotateGateway`, {});
		expect(answer.failure).toBe(400);
		expect(count('select count(*) as n from gateways where vessel_id = ?', ids['north-gale'])).toBe(
			0
		);
	});

	it('rotation shows the password once, stores only its argon2 hash, and locks out the old one', async () => {
		const code = 'skerry-lark';
		gateway = await connectGateway(server.mqttPort, code); // signed in with the demo password
		const closed = new Promise<void>((resolve) => gateway!.once('close', () => resolve()));

		const answer = await act(admin, `/admin/fleet/${ids[code]}?/rotateGateway`, {
			confirm: 'rotate'
		});
		expect(answer.type).toBe('success');
		expect(answer.headers.get('cache-control')).toBe('no-store');
		const { username, password } = answer.data!.credentials as {
			username: string;
			password: string;
		};
		expect(username).toBe(`gw-${code}`);
		expect(password.length).toBeGreaterThanOrEqual(24);

		const row = db.prepare('select * from gateways where vessel_id = ?').get(ids[code]) as {
			username: string;
			password_hash: string;
		};
		expect(row.username).toBe(username);
		expect(row.password_hash.startsWith('$argon2id$')).toBe(true);
		// nowhere in the database: not in the main file, not in its write-ahead log
		const files = readdirSync(server.dir).filter((f) => f.startsWith('aftwater.db'));
		expect(files).toContain('aftwater.db');
		for (const f of files) {
			expect(readFileSync(join(server.dir, f)).includes(Buffer.from(password)), f).toBe(false);
		}

		// the old gateway session is dropped, and the page never shows the password again
		await closed;
		const page = await (await admin.get(`/admin/fleet/${ids[code]}`)).text();
		expect(page).toContain(username);
		expect(page).not.toContain(password);
		await expect(connectGateway(server.mqttPort, code)).rejects.toThrow();
		const fresh = await connectGateway(server.mqttPort, code, { password });
		fresh.end(true);
	});

	it('the page names the broker and topic prefix a gateway maker needs', async () => {
		const html = await (await admin.get(`/admin/fleet/${ids['skerry-lark']}`)).text();
		// the test server's broker listens on 127.0.0.1 (MQTT_HOST), and the page says so
		expect(html).toContain(`mqtt://127.0.0.1:${server.mqttPort}`);
		expect(html).toContain('listening only on this machine');
		expect(html).toContain('aftwater/v1/skerry-lark/{shaft}/telemetry');
		expect(html).toContain('aftwater/v1/skerry-lark/separator/command');
	});
});

describe('audit log and ingest health', () => {
	it('the audit log filters by action and vessel, newest first, with details readable', async () => {
		const html = await (
			await admin.get(`/admin/audit?action=shaft.update&vessel=${ids['north-gale']}`)
		).text();
		const actions = [...html.matchAll(/data-action="([^"]+)"/g)].map((m) => m[1]);
		expect(actions).toEqual(['shaft.update']);
		expect(html).toContain('Port shaft (aft bearing)');
		// the shaft is named in the "What" column, its id beside
		expect(html).toMatch(/<td>shaft Port shaft \(aft bearing\) \(\d+\)<\/td>/);
		const all = await (await admin.get(`/admin/audit?vessel=${ids['north-gale']}`)).text();
		const order = [...all.matchAll(/data-action="([^"]+)"/g)].map((m) => m[1]);
		// newest first: the vessel was created before anything else happened to it
		expect(order.at(-1)).toBe('vessel.create');
		expect(order[0]).toBe('vessel.update');
	});

	it('the audit log pages through the entries, 50 to a page', async () => {
		for (let i = 1; i <= 55; i++) {
			expect((await admin.post('/api/me/tokens', { name: `token ${i}` })).status).toBe(201);
		}
		const first = await (await admin.get('/admin/audit?action=token.issue')).text();
		expect(first).toContain('Page 1 of 2');
		expect([...first.matchAll(/data-testid="audit-row"/g)]).toHaveLength(50);
		expect(first).toContain('token 55');
		expect(first).not.toContain('token 5<');
		const second = await (await admin.get('/admin/audit?action=token.issue&page=2')).text();
		expect(second).toContain('Page 2 of 2');
		expect([...second.matchAll(/data-testid="audit-row"/g)]).toHaveLength(5);
		expect(second).toContain('token 1<');
		expect(second).not.toContain('token 55');
	});

	it('shows the health figures and rejected messages, escaping their payloads', async () => {
		const gw = await connectGateway(server.mqttPort, 'hallow-tern');
		const before = (await (await fetch(`${server.url}/api/health`)).json()).ingest.rejected_total;
		await gw.publishAsync(telemetry('hallow-tern', 'main'), '<script>alert("aft")</script>', {
			qos: 1
		});
		gw.end(true);
		await waitFor(
			async () =>
				count("select count(*) as n from rejected_messages where reason = 'malformed_json'") > 0,
			{ what: 'the rejected message to be logged' }
		);
		const health = (await (await fetch(`${server.url}/api/health`)).json()).ingest;
		expect(health.rejected_total).toBe(before + 1);

		const html = await (await admin.get('/admin/ingest')).text();
		expect(html).toMatch(new RegExp(`data-testid="rejected-total">${health.rejected_total}<`));
		expect(html).toMatch(/data-testid="received-total">[\d,]+</);
		expect(html).toMatch(/data-testid="broker-clients">\d+</);
		expect(html).toContain('data-reason="malformed_json"');
		expect(html).toContain('aftwater/v1/hallow-tern/main/telemetry');
		expect(html).toContain('&lt;script>alert("aft")&lt;/script>');
		expect(html).not.toContain('<script>alert("aft")');
	});
});

describe('who may use the admin pages', () => {
	const pages = () => [
		'/admin',
		'/admin/fleet',
		`/admin/fleet/${ids['corrin-bay']}`,
		'/admin/users',
		`/admin/users/${(db.prepare("select id from users where email = 'admin@demo.test'").get() as { id: string }).id}`,
		'/admin/audit',
		'/admin/ingest'
	];
	const actions = () => {
		const vessel = ids['corrin-bay'];
		const shaft = shaftRow(vessel, 'port')!.id;
		const user = (
			db.prepare("select id from users where email = 'tech@demo.test'").get() as { id: string }
		).id;
		return [
			['/admin/fleet?/createVessel', { code: 'stowaway', name: 'Stowaway' }],
			[`/admin/fleet/${vessel}?/updateVessel`, { name: 'Taken' }],
			[
				`/admin/fleet/${vessel}?/createShaft`,
				{ code: 'extra', name: 'Extra', diameter: '300', centreline_depth: '3' }
			],
			[
				`/admin/fleet/${vessel}?/updateShaft`,
				{
					shaft_id: String(shaft),
					name: 'Taken',
					diameter: '999',
					centreline_depth: '1',
					min_flow_factor: '0.01'
				}
			],
			[`/admin/fleet/${vessel}?/rotateGateway`, { confirm: 'rotate' }],
			['/admin/users?/create', { email: 'intruder@example.org', name: 'Intruder', role: 'admin' }],
			[`/admin/users/${user}?/update`, { name: 'Taken', role: 'admin' }],
			[`/admin/users/${user}?/disable`, {}],
			[`/admin/users/${user}?/enable`, {}],
			[`/admin/users/${user}?/sendLink`, {}]
		] as [string, Record<string, string>][];
	};

	it('every other role gets 403 on every admin page and action, and nothing changes', async () => {
		const snapshot = () =>
			JSON.stringify([
				db.prepare('select * from vessels order by id').all(),
				db.prepare('select * from shafts order by id').all(),
				db.prepare('select vessel_id, password_hash from gateways order by vessel_id').all(),
				db.prepare('select id, name, role, disabled_at from users order by id').all(),
				count('select count(*) as n from mail_outbox')
			]);
		const before = snapshot();
		// corrin-bay is in the on-board users' own scope, so the answer is about role, not scope
		for (const email of [
			'fleet@demo.test',
			'chief@demo.test',
			'tech@demo.test',
			'shore@demo.test'
		]) {
			const c = await signIn(server.url, email);
			for (const path of pages()) {
				const res = await c.request('GET', path, undefined, { accept: 'text/html' });
				expect(res.status, `${email} GET ${path}`).toBe(403);
			}
			for (const [path, fields] of actions()) {
				const answer = await act(c, path, fields);
				expect([answer.status, answer.type], `${email} POST ${path}`).toEqual([403, 'error']);
			}
		}
		expect(snapshot()).toBe(before);
	});

	it('signed out, the admin pages send the browser to sign in', async () => {
		const anonymous = client(server.url);
		for (const path of pages()) {
			const res = await anonymous.get(path);
			expect(res.status, path).toBe(303);
			expect(res.headers.get('location')).toBe(`/login?next=${encodeURIComponent(path)}`);
		}
	});
});
