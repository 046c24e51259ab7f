/**
 * Commissioning and maintenance records over HTTP against the built app (`vite build` first):
 * seal pressure tests judged pass/fail with the reasons, bearing clearances, the wear-down
 * trend to the wear limit, shrink-fit plans, and photo/PDF attachments whose bytes decide
 * their type. Every change is stored once and audited; a rejected request stores nothing;
 * only admin, chief engineer and technician write; everyone in the vessel's scope reads;
 * outside it the shaft does not exist (404, from hooks).
 */
import { createHash } from 'node:crypto';
import { crc32, deflateSync } from 'node:zlib';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from './helpers/server';
import { client, signIn, type Client } from './helpers/http';

let server: TestServer;
let db: Database.Database;
let admin: Client;
let fleet: Client;
let chief: Client; // corrin-bay and skerry-lark
let tech: Client; // corrin-bay and hallow-tern
let shore: Client;
const ids: Record<string, { vessel: number; shaft: number }> = {};

const shaftOf = (code: string) => ids[code].shaft;
const records = (shaftId: number, path = '') => `/api/shafts/${shaftId}/records${path}`;

const RECORD_TABLES = [
	'seal_tests',
	'bearing_measurements',
	'wear_readings',
	'wear_limits',
	'shrink_fit_plans',
	'record_attachments'
] as const;

/** rows of each records table for one shaft, read from the SQLite file beside the server */
function counts(shaftId: number): Record<(typeof RECORD_TABLES)[number], number> {
	return Object.fromEntries(
		RECORD_TABLES.map((t) => [
			t,
			(
				db.prepare(`select count(*) as n from ${t} where shaft_id = ?`).get(shaftId) as {
					n: number;
				}
			).n
		])
	) as Record<(typeof RECORD_TABLES)[number], number>;
}

function auditRows(action: string, shaftId: number) {
	return db
		.prepare(
			'select actor, entity, entity_id, vessel_id, details from audit_log where action = ? and entity_id = ? order by id'
		)
		.all(action, String(shaftId)) as {
		actor: string;
		entity: string;
		entity_id: string;
		vessel_id: number;
		details: string;
	}[];
}

/** a multipart post as the page's form sends it (same origin, or SvelteKit refuses it as cross-site) */
function attach(
	c: Client,
	shaftId: number,
	name: string,
	content: Uint8Array<ArrayBuffer> | string,
	type: string,
	notes = ''
) {
	const form = new FormData();
	form.set('file', new File([content], name, { type }));
	if (notes) form.set('notes', notes);
	const headers: Record<string, string> = { origin: server.env.ORIGIN };
	if (c.cookie) headers.cookie = c.cookie;
	return fetch(server.url + records(shaftId, '/attachments'), {
		method: 'POST',
		body: form,
		headers
	});
}

/** A real 1 × 1 RGBA PNG, assembled by hand: signature, IHDR, IDAT, IEND (each chunk with its CRC-32). */
function tinyPng(): Uint8Array<ArrayBuffer> {
	const chunk = (type: string, data: Uint8Array) => {
		const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
		const out = Buffer.alloc(12 + data.length);
		out.writeUInt32BE(data.length, 0);
		body.copy(out, 4);
		out.writeUInt32BE(crc32(body), 8 + data.length);
		return out;
	};
	const ihdr = Buffer.alloc(13);
	ihdr.writeUInt32BE(1, 0); // width
	ihdr.writeUInt32BE(1, 4); // height
	ihdr.set([8, 6, 0, 0, 0], 8); // 8 bits, RGBA, deflate, no filter, no interlace
	const scanline = Buffer.from([0, 0x1f, 0x6f, 0x8f, 0xff]); // filter byte + one teal pixel
	const png = Buffer.concat([
		Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
		chunk('IHDR', ihdr),
		chunk('IDAT', deflateSync(scanline)),
		chunk('IEND', new Uint8Array(0))
	]);
	return new Uint8Array(png);
}

/** 3 bar held 180 s, read every 30 s; `fall` is how far the pressure sinks evenly over the hold */
function sealTest(fall = 0, extra: Record<string, unknown> = {}) {
	return {
		seal: 'aft',
		tested_at: '2026-11-20T09:30:00Z',
		test_pressure_bar: 3,
		hold_s: 180,
		resolution_bar: 0.01,
		leak_seen: false,
		readings: [0, 30, 60, 90, 120, 150, 180].map((t_s) => ({
			t_s,
			pressure_bar: Math.round((3 - (fall * t_s) / 180) * 1000) / 1000
		})),
		notes: 'installation check after re-packing',
		...extra
	};
}

const bearing = (bore_mm: number, journal_mm: number, max_clearance_mm: number | null) => ({
	bearing: 'aft',
	measured_at: '2026-11-21T14:00:00+01:00',
	bore_mm,
	journal_mm,
	max_clearance_mm
});

const shrinkFit = (extra: Record<string, unknown> = {}) => ({
	bore_mm: 300,
	interference_mm: 0.3,
	assembly_clearance_mm: 0.15,
	material: 'bronze_c93200',
	ambient_c: 20,
	...extra
});

beforeAll(async () => {
	server = await startServer({ ALARM_RULES: '0' });
	db = new Database(server.dbPath, { readonly: true, fileMustExist: true });
	[admin, fleet, chief, tech, shore] = await Promise.all(
		[
			'admin@demo.test',
			'fleet@demo.test',
			'chief@demo.test',
			'tech@demo.test',
			'shore@demo.test'
		].map((e) => signIn(server.url, e))
	);
	const { vessels } = await (await admin.get('/api/vessels')).json();
	for (const v of vessels)
		for (const s of v.shafts) ids[`${v.code}/${s.code}`] = { vessel: v.id, shaft: s.id };
	expect(Object.keys(ids)).toEqual(
		expect.arrayContaining(['corrin-bay/port', 'corrin-bay/stbd', 'hallow-tern/main'])
	);
	// a shaft with no records at all (the demo seed gives each demo shaft some), for the wear trend
	const added = await admin.post(`/api/vessels/${ids['corrin-bay/port'].vessel}/shafts`, {
		code: 'wear-trial',
		name: 'Wear trial shaft',
		position: 'centre',
		diameter_mm: 420,
		centreline_depth_m: 4.2
	});
	expect(added.status).toBe(201);
	ids['corrin-bay/wear-trial'] = {
		vessel: ids['corrin-bay/port'].vessel,
		shaft: (await added.json()).shaft.id
	};
});
afterAll(async () => {
	db?.close();
	await server?.stop();
});

describe('seal pressure tests', () => {
	it('judges a held test a pass and a falling one a fail, lists both and audits each', async () => {
		const shaft = shaftOf('corrin-bay/port');
		const before = counts(shaft);

		const held = await admin.post(records(shaft, '/seal-tests'), sealTest(0));
		expect(held.status).toBe(201);
		const pass = (await held.json()).seal_test;
		expect(pass).toMatchObject({
			shaft_id: shaft,
			seal: 'aft',
			tested_at: Date.UTC(2026, 10, 20, 9, 30),
			test_pressure_bar: 3,
			hold_s: 180,
			leak_seen: false,
			result: 'pass',
			recorded_by: 'admin@demo.test',
			notes: 'installation check after re-packing'
		});
		expect(pass.readings).toHaveLength(7);
		expect(pass.judgement).toMatchObject({
			result: 'pass',
			reached_at_s: 0,
			held_s: 180,
			drop_bar: 0,
			reasons: []
		});

		// 3.00 → 2.95 bar over the hold: a fall of 0.05 bar, five times what a 0.01 bar gauge resolves
		const falling = await admin.post(records(shaft, '/seal-tests'), sealTest(0.05));
		expect(falling.status).toBe(201);
		const fail = (await falling.json()).seal_test;
		expect(fail.readings.at(-1)).toEqual({ t_s: 180, pressure_bar: 2.95 });
		expect(fail.result).toBe('fail');
		expect(fail.judgement.drop_bar).toBeCloseTo(0.05, 9);
		expect(fail.judgement.reasons).toEqual([expect.stringMatching(/fell by 0\.05 bar/)]);

		// stored once each
		expect(counts(shaft).seal_tests).toBe(before.seal_tests + 2);
		const stored = db
			.prepare('select result from seal_tests where id in (?, ?) order by id')
			.all(pass.id, fail.id);
		expect(stored).toEqual([{ result: 'pass' }, { result: 'fail' }]);

		// both in the list of seal tests and in the shaft's records, for a reader too
		const list = await shore.get(records(shaft, '/seal-tests'));
		expect(list.status).toBe(200);
		const listed = (await list.json()).seal_tests as { id: number; result: string }[];
		expect(
			listed
				.filter((t) => t.id === pass.id || t.id === fail.id)
				.map((t) => [t.id, t.result])
				.sort()
		).toEqual(
			[
				[pass.id, 'pass'],
				[fail.id, 'fail']
			].sort()
		);
		const all = await (await shore.get(records(shaft))).json();
		expect(Object.keys(all).sort()).toEqual([
			'attachments',
			'bearing_measurements',
			'seal_tests',
			'shrink_fits',
			'wear'
		]);
		const inAll = all.seal_tests.find((t: { id: number }) => t.id === fail.id);
		expect(inAll).toMatchObject({ result: 'fail', judgement: { reasons: fail.judgement.reasons } });

		// audited: who, which shaft and vessel, which record and its result
		const audit = auditRows('records.seal_test.add', shaft).map((a) => ({
			...a,
			details: JSON.parse(a.details)
		}));
		const mine = audit.filter(
			(a) => a.details.record_id === pass.id || a.details.record_id === fail.id
		);
		expect(mine).toEqual([
			{
				actor: 'admin@demo.test',
				entity: 'shaft',
				entity_id: String(shaft),
				vessel_id: ids['corrin-bay/port'].vessel,
				details: expect.objectContaining({
					record_id: pass.id,
					result: 'pass',
					test_pressure_bar: 3,
					hold_s: 180
				})
			},
			{
				actor: 'admin@demo.test',
				entity: 'shaft',
				entity_id: String(shaft),
				vessel_id: ids['corrin-bay/port'].vessel,
				details: expect.objectContaining({ record_id: fail.id, result: 'fail' })
			}
		]);
		// and readable on the administrators' audit page
		const page = await admin.get('/admin/audit?action=records.seal_test.add');
		expect(page.status).toBe(200);
		// newest first: the two just made lead, each naming who made it (the demo seed's rows follow)
		const rows = (await page.text()).split('data-testid="audit-row"').slice(1, 3);
		expect(
			rows.map((r) => [/data-action="([^"]+)"/.exec(r)?.[1], r.includes('admin@demo.test')])
		).toEqual([
			['records.seal_test.add', true],
			['records.seal_test.add', true]
		]);
	});

	// a fall of exactly one gauge step is a fall however binary rounding treats the decimals:
	// 3.02 − 3.01 = 0.010000000000000231 but 3.00 − 2.99 = 0.009999999999999787
	it('a fall of exactly one gauge step fails the test, whatever the pressures', async () => {
		const shaft = shaftOf('corrin-bay/port');
		const results: [string, string][] = [];
		for (const [from, to] of [
			[3.02, 3.01],
			[3.0, 2.99],
			[3.01, 3.0]
		]) {
			const readings = [0, 30, 60, 90, 120, 150, 180].map((t_s) => ({
				t_s,
				pressure_bar: t_s === 180 ? to : from
			}));
			const res = await admin.post(
				records(shaft, '/seal-tests'),
				sealTest(0, { test_pressure_bar: from, readings })
			);
			expect(res.status).toBe(201);
			results.push([`${from} → ${to}`, (await res.json()).seal_test.result]);
		}
		expect(results).toEqual([
			['3.02 → 3.01', 'fail'],
			['3 → 2.99', 'fail'],
			['3.01 → 3', 'fail']
		]);
	});

	it('refuses unreadable (400), non-JSON (415) and invalid bodies (422, naming the field), storing nothing', async () => {
		const shaft = shaftOf('corrin-bay/port');
		const before = counts(shaft);
		const auditBefore = auditRows('records.seal_test.add', shaft).length;
		const path = records(shaft, '/seal-tests');

		const broken = await admin.request('POST', path, '{"seal": "aft", "tested_at":', {
			'content-type': 'application/json'
		});
		expect(broken.status).toBe(400);
		expect((await broken.json()).error.code).toBe('bad_json');

		// text/plain is a form content type: sent from the app's own origin so SvelteKit's CSRF check passes
		const text = await admin.request('POST', path, JSON.stringify(sealTest()), {
			'content-type': 'text/plain',
			origin: server.env.ORIGIN
		});
		expect(text.status).toBe(415);
		expect((await text.json()).error.code).toBe('unsupported_media_type');

		const { leak_seen: _, ...noLeak } = sealTest();
		const cases: [string, unknown][] = [
			['leak_seen', noLeak],
			['test_pressure_bar', sealTest(0, { test_pressure_bar: -3 })],
			['readings', sealTest(0, { readings: [{ t_s: 0, pressure_bar: 3 }] })],
			// a 0.5 bar step on a 3 bar test could not show the 10 % fall that fails it
			['resolution_bar', sealTest(0, { resolution_bar: 0.5 })],
			['tested_at', sealTest(0, { tested_at: '2026-11-20T09:30:00' })], // no zone: which 09:30?
			['tested_at', sealTest(0, { tested_at: 1_764_000_000 })] // epoch seconds, not ms: 1970 if taken as ms
		];
		for (const [field, body] of cases) {
			const res = await admin.post(path, body);
			const answer = await res.json();
			// the one field at fault, and only it
			expect([
				field,
				res.status,
				answer.error.code,
				Object.keys(answer.error.fields ?? {})
			]).toEqual([field, 422, 'invalid', [field]]);
			expect(answer.error.message).toMatch(new RegExp(`^${field}: `));
		}

		expect(counts(shaft)).toEqual(before);
		expect(auditRows('records.seal_test.add', shaft)).toHaveLength(auditBefore);
	});
});

describe('bearing measurements', () => {
	it('answers the running clearance, bore less journal, over the limit when above the maximum', async () => {
		const shaft = shaftOf('corrin-bay/port');
		// 420.62 − 420.10 = 0.52 mm, above the maker's 0.50 mm
		const over = await chief.post(
			records(shaft, '/bearing-measurements'),
			bearing(420.62, 420.1, 0.5)
		);
		expect(over.status).toBe(201);
		const m = (await over.json()).bearing_measurement;
		expect(m).toMatchObject({
			bore_mm: 420.62,
			journal_mm: 420.1,
			max_clearance_mm: 0.5,
			recorded_by: 'chief@demo.test'
		});
		expect(m.measured_at).toBe(Date.UTC(2026, 10, 21, 13, 0)); // 14:00 at +01:00
		expect(m.clearance.clearance_mm).toBeCloseTo(0.52, 9);
		expect(m.clearance.per_mille).toBeCloseTo((0.52 / 420.1) * 1000, 6); // 1.2378 ‰
		expect(m.clearance.state).toBe('over_limit');
		const row = db
			.prepare('select clearance_mm from bearing_measurements where id = ?')
			.get(m.id) as { clearance_mm: number };
		expect(row.clearance_mm).toBeCloseTo(0.52, 9);

		// 420.45 − 420.10 = 0.35 mm, within 0.50 mm
		const within = await chief.post(
			records(shaft, '/bearing-measurements'),
			bearing(420.45, 420.1, 0.5)
		);
		expect(within.status).toBe(201);
		const ok = (await within.json()).bearing_measurement;
		expect(ok.clearance.clearance_mm).toBeCloseTo(0.35, 9);
		expect(ok.clearance.state).toBe('ok');

		const listed = (await (await shore.get(records(shaft, '/bearing-measurements'))).json())
			.bearing_measurements;
		expect(
			listed
				.filter((b: { id: number }) => b.id === m.id || b.id === ok.id)
				.map((b: { clearance: { state: string } }) => b.clearance.state)
				.sort()
		).toEqual(['ok', 'over_limit']);
		expect(
			auditRows('records.bearing_measurement.add', shaft).map(
				(a) => JSON.parse(a.details).record_id
			)
		).toEqual(expect.arrayContaining([m.id, ok.id]));
	});
});

describe('wear-down', () => {
	it('fits the wear rate to the readings and projects when the wear limit is reached', async () => {
		// a shaft added for this test: the demo seed gives every demo shaft its own wear readings
		const shaft = shaftOf('corrin-bay/wear-trial');
		const path = records(shaft, '/wear');
		expect((await admin.get(path)).status).toBe(200);

		// a limit needs to say where it comes from
		const bare = await chief.put(records(shaft, '/wear-limit'), { wear_limit_mm: 1.56 });
		expect(bare.status).toBe(422);
		expect(Object.keys((await bare.json()).error.fields)).toEqual(['reason']);
		expect(counts(shaft).wear_limits).toBe(0);

		const limit = await admin.put(records(shaft, '/wear-limit'), {
			wear_limit_mm: 1.56,
			reason: 'bearing maker’s renewal limit, drawing TB-420 rev C'
		});
		expect(limit.status).toBe(200);
		expect(await limit.json()).toMatchObject({
			wear_limit_mm: 1.56,
			limit_updated_by: 'admin@demo.test',
			readings: []
		});
		expect(auditRows('records.wear_limit.set', shaft).map((a) => JSON.parse(a.details))).toEqual([
			{
				wear_limit_mm: { from: null, to: 1.56 },
				reason: 'bearing maker’s renewal limit, drawing TB-420 rev C'
			}
		]);

		// Readings a Julian year (365.25 d) apart from the installation, posted out of order:
		//   x (years)  0     1     2     3
		//   reading    0.80  1.10  1.50  1.70 mm  → wear (reading − 0.80) y = 0, 0.30, 0.70, 0.90
		// x̄ = 1.5, ȳ = 1.90 / 4 = 0.475
		// Sxx = 2.25 + 0.25 + 0.25 + 2.25 = 5
		// Sxy = (−1.5)(−0.475) + (−0.5)(−0.175) + (0.5)(0.225) + (1.5)(0.425)
		//     = 0.7125 + 0.0875 + 0.1125 + 0.6375 = 1.55
		// rate = 1.55 / 5 = 0.31 mm/year; intercept = 0.475 − 0.31 × 1.5 = 0.01 mm
		// limit 1.56 mm reached at (1.56 − 0.01) / 0.31 = 5 years = 1826.25 d → 2026-01-01T06:00Z
		const readings = [
			{ measured_at: '2023-01-01T12:00:00Z', reading_mm: 1.5 },
			{ measured_at: '2021-01-01T00:00:00Z', reading_mm: 0.8 },
			{ measured_at: '2024-01-01T20:00:00+02:00', reading_mm: 1.7 }, // 18:00Z
			{ measured_at: Date.UTC(2022, 0, 1, 6), reading_mm: 1.1 }
		];
		for (const r of readings) {
			const res = await tech.post(path, { ...r, method: 'poker_gauge' });
			expect(res.status).toBe(201);
		}

		const wear = await (await shore.get(path)).json();
		expect(wear.readings.map((r: { measured_at: number }) => r.measured_at)).toEqual([
			Date.UTC(2021, 0, 1, 0),
			Date.UTC(2022, 0, 1, 6),
			Date.UTC(2023, 0, 1, 12),
			Date.UTC(2024, 0, 1, 18)
		]);
		const { trend } = wear;
		expect(trend.baseline).toMatchObject({ measured_at: Date.UTC(2021, 0, 1), reading_mm: 0.8 });
		expect(trend.points.map((p: { wear_mm: number }) => p.wear_mm)).toEqual([
			0,
			expect.closeTo(0.3, 9),
			expect.closeTo(0.7, 9),
			expect.closeTo(0.9, 9)
		]);
		expect(trend.rate_mm_per_year).toBeCloseTo(0.31, 9);
		expect(trend.latest_wear_mm).toBeCloseTo(0.9, 9);
		expect(trend.limit_mm).toBe(1.56);
		expect(trend.remaining_mm).toBeCloseTo(0.66, 9);
		expect(trend.state).toBe('ok');
		expect(trend.projected_limit_at).not.toBeNull();
		// within a second of 2026-01-01T06:00Z
		expect(Math.abs(trend.projected_limit_at - Date.UTC(2026, 0, 1, 6))).toBeLessThan(1000);

		const fromAll = (await (await shore.get(records(shaft))).json()).wear;
		expect(fromAll.trend.rate_mm_per_year).toBeCloseTo(0.31, 9);
		expect(auditRows('records.wear_reading.add', shaft)).toHaveLength(4);
	});

	it('a voided reading stays listed but no longer counts, not even as the baseline', async () => {
		const shaft = shaftOf('corrin-bay/wear-trial');
		const path = records(shaft, '/wear');
		// a mistaken reading dated before the installation becomes the baseline and spoils the trend…
		const wrong = await tech.post(path, { measured_at: '2020-01-01T00:00:00Z', reading_mm: 5 });
		expect(wrong.status).toBe(201);
		const spoiled = await wrong.json();
		expect(spoiled.trend.baseline.reading_mm).toBe(5);
		const wrongId = spoiled.readings[0].id as number;

		// …until it is voided, with a reason
		const voidPath = records(shaft, `/wear/${wrongId}/void`);
		const bare = await tech.post(voidPath, {});
		expect(bare.status).toBe(422);
		expect(Object.keys((await bare.json()).error.fields)).toEqual(['reason']);
		expect((await shore.post(voidPath, { reason: 'wrong year' })).status).toBe(403);
		const ok = await tech.post(voidPath, { reason: 'typed the year wrong; see the 2021 reading' });
		expect(ok.status).toBe(200);
		expect((await tech.post(voidPath, { reason: 'again' })).status).toBe(409);

		const wear = await (await shore.get(path)).json();
		expect(wear.readings).toHaveLength(5);
		expect(wear.readings[0]).toMatchObject({
			id: wrongId,
			wear_mm: null,
			voided: { by: 'tech@demo.test', reason: 'typed the year wrong; see the 2021 reading' }
		});
		// the same trend as before the mistake (the hand-worked example above)
		expect(wear.trend.baseline).toMatchObject({
			measured_at: Date.UTC(2021, 0, 1),
			reading_mm: 0.8
		});
		expect(wear.trend.rate_mm_per_year).toBeCloseTo(0.31, 9);
		expect(wear.readings[1].wear_mm).toBe(0);
		expect(auditRows('records.void', shaft).map((a) => JSON.parse(a.details))).toEqual([
			{ kind: 'wear', record_id: wrongId, reason: 'typed the year wrong; see the 2021 reading' }
		]);

		// a record is voided only under its own shaft, and only a kind the API knows
		const other = shaftOf('corrin-bay/stbd');
		expect(
			(await tech.post(records(other, `/wear/${wrongId}/void`), { reason: 'not here' })).status
		).toBe(404);
		expect(
			(await tech.post(records(shaft, `/logbook/${wrongId}/void`), { reason: 'no such kind' }))
				.status
		).toBe(404);
	});
});

describe('shrink-fit plans', () => {
	it('plans the liner heat from the interference, clearance and the bronze α', async () => {
		const shaft = shaftOf('corrin-bay/port');
		// ΔT = (δ + c) / (α · d) (Engineering ToolBox, shrink fit) with α = 18.0e-6 /K for bearing
		// bronze C93200 (Callister, Table B.6): (0.3 + 0.15) / (18.0e-6 × 300) = 0.45 / 0.0054
		// = 83.33 K; heated from 20 °C that is 103.33 °C
		const res = await tech.post(records(shaft, '/shrink-fits'), shrinkFit());
		expect(res.status).toBe(201);
		const plan = (await res.json()).shrink_fit;
		expect(plan).toMatchObject({
			material: 'bronze_c93200',
			alpha_per_k: 18.0e-6,
			ambient_c: 20,
			recorded_by: 'tech@demo.test'
		});
		expect(plan.plan.delta_k).toBeCloseTo(83.333, 3);
		expect(plan.plan.heat_to_c).toBeCloseTo(103.333, 3);
		expect(plan.plan.bore_growth_mm).toBeCloseTo(0.45, 9);
		const row = db
			.prepare('select delta_k, heat_to_c from shrink_fit_plans where id = ?')
			.get(plan.id) as {
			delta_k: number;
			heat_to_c: number;
		};
		expect(row.delta_k).toBeCloseTo(83.333, 3);
		expect(row.heat_to_c).toBeCloseTo(103.333, 3);
		const listed = (await (await shore.get(records(shaft, '/shrink-fits'))).json()).shrink_fits;
		expect(listed.find((p: { id: number }) => p.id === plan.id)?.plan.delta_k).toBeCloseTo(
			83.333,
			3
		);
	});

	it('another material needs its expansion coefficient', async () => {
		const shaft = shaftOf('corrin-bay/port');
		const before = counts(shaft);
		const res = await admin.post(records(shaft, '/shrink-fits'), shrinkFit({ material: 'other' }));
		expect(res.status).toBe(422);
		expect(Object.keys((await res.json()).error.fields)).toEqual(['alpha_per_k']);
		expect(counts(shaft)).toEqual(before);

		// with it: 0.45 / (12.0e-6 × 300) = 0.45 / 0.0036 = 125 K
		const given = await admin.post(
			records(shaft, '/shrink-fits'),
			shrinkFit({ material: 'other', alpha_per_k: 12.0e-6 })
		);
		expect(given.status).toBe(201);
		expect((await given.json()).shrink_fit.plan.delta_k).toBeCloseTo(125, 6);
	});
});

describe('attachments', () => {
	it('stores a PNG and serves the same bytes back, as a PNG, never sniffed', async () => {
		const shaft = shaftOf('corrin-bay/port');
		const png = tinyPng();
		const res = await attach(
			chief,
			shaft,
			'pump-room.png',
			png,
			'image/png',
			'seal housing after re-packing'
		);
		expect(res.status).toBe(201);
		const { attachment } = await res.json();
		expect(attachment).toMatchObject({
			shaft_id: shaft,
			filename: 'pump-room.png',
			content_type: 'image/png',
			size_bytes: png.length,
			sha256: createHash('sha256').update(png).digest('hex'),
			notes: 'seal housing after re-packing',
			recorded_by: 'chief@demo.test',
			url: `/api/shafts/${shaft}/records/attachments/${attachment.id}`
		});

		const file = await shore.get(attachment.url);
		expect(file.status).toBe(200);
		expect(file.headers.get('content-type')).toBe('image/png');
		expect(file.headers.get('x-content-type-options')).toBe('nosniff');
		expect(file.headers.get('content-disposition')).toBe("inline; filename*=UTF-8''pump-room.png");
		expect(new Uint8Array(await file.arrayBuffer())).toEqual(png);

		// a PDF is downloaded, not opened on the app's own origin, unless asked for inline
		const pdfBytes = new TextEncoder().encode(
			'%PDF-1.4\n%âãÏÓ\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n'
		);
		const pdf = await fetch(server.url + records(shaft, '/attachments?filename=survey.pdf'), {
			method: 'POST',
			body: pdfBytes,
			headers: { cookie: chief.cookie!, 'content-type': 'application/pdf' }
		});
		expect(pdf.status).toBe(201);
		const pdfUrl = (await pdf.json()).attachment.url as string;
		expect((await shore.get(pdfUrl)).headers.get('content-disposition')).toBe(
			"attachment; filename*=UTF-8''survey.pdf"
		);
		expect((await shore.get(`${pdfUrl}?inline`)).headers.get('content-disposition')).toMatch(
			/^inline;/
		);

		const listed = (await (await shore.get(records(shaft, '/attachments'))).json()).attachments;
		expect(listed.map((a: { id: number }) => a.id)).toContain(attachment.id);
		expect(
			auditRows('records.attachment.add', shaft).map((a) => JSON.parse(a.details))
		).toContainEqual(
			expect.objectContaining({
				record_id: attachment.id,
				content_type: 'image/png',
				size_bytes: png.length
			})
		);
	});

	it('refuses a file that is not what it claims (415) and one over 10 MiB (413), storing nothing', async () => {
		const shaft = shaftOf('corrin-bay/port');
		const before = counts(shaft);

		const text = await attach(chief, shaft, 'photo.png', 'not a photo, just words\n', 'image/png');
		expect(text.status).toBe(415);
		expect((await text.json()).error.code).toBe('unsupported_type');

		// a script's raw upload: HTML declared as a PDF
		const html = await chief.request(
			'POST',
			records(shaft, '/attachments?filename=report.pdf'),
			'<!doctype html><html><body><script>alert(1)</script></body></html>',
			{ 'content-type': 'application/pdf' }
		);
		expect(html.status).toBe(415);

		// a script's raw upload whose bytes are another accepted kind than it declares
		const mislabelled = await fetch(
			server.url + records(shaft, '/attachments?filename=report.pdf'),
			{
				method: 'POST',
				body: tinyPng(),
				headers: { cookie: chief.cookie!, 'content-type': 'application/pdf' }
			}
		);
		expect(mislabelled.status).toBe(415);
		expect((await mislabelled.json()).error.message).toMatch(/image\/png, not application\/pdf/);

		// a PNG in every other respect, one byte over the limit (the server's body limit is 25M)
		const big = new Uint8Array(10 * 1024 * 1024 + 1);
		big.set(tinyPng());
		const res = await attach(chief, shaft, 'huge.png', big, 'image/png');
		expect(res.status).toBe(413);
		expect((await res.json()).error.code).toBe('too_large');

		expect(counts(shaft)).toEqual(before);
	});

	it('an attachment is found only under its own shaft', async () => {
		const port = shaftOf('corrin-bay/port');
		const stbd = shaftOf('corrin-bay/stbd');
		const res = await attach(admin, port, 'liner.png', tinyPng(), 'image/png');
		expect(res.status).toBe(201);
		const { attachment } = await res.json();
		expect((await admin.get(records(port, `/attachments/${attachment.id}`))).status).toBe(200);
		const elsewhere = await admin.get(records(stbd, `/attachments/${attachment.id}`));
		expect(elsewhere.status).toBe(404);
		expect((await elsewhere.json()).error.code).toBe('not_found');
		expect((await admin.get(records(port, '/attachments/999999'))).status).toBe(404);
	});
});

describe('roles and vessel scope', () => {
	/** every write, each with a valid body: a refusal is the role's, not the body's */
	const writes: [method: string, path: string, body: unknown][] = [
		['POST', '/seal-tests', sealTest()],
		['POST', '/bearing-measurements', bearing(420.45, 420.1, 0.5)],
		['POST', '/wear', { measured_at: '2026-11-01T08:00:00Z', reading_mm: 1.2 }],
		['PUT', '/wear-limit', { wear_limit_mm: 2, reason: 'class society limit' }],
		['POST', '/shrink-fits', shrinkFit()]
	];
	const reads = [
		'',
		'/seal-tests',
		'/bearing-measurements',
		'/wear',
		'/shrink-fits',
		'/attachments'
	];

	it('shore office and fleet manager read every record but may write none', async () => {
		const shaft = shaftOf('corrin-bay/stbd');
		const before = counts(shaft);
		for (const [who, c] of [
			['shore', shore],
			['fleet', fleet]
		] as const) {
			for (const path of reads) {
				expect([who, 'GET', path, (await c.get(records(shaft, path))).status]).toEqual([
					who,
					'GET',
					path,
					200
				]);
			}
			for (const [method, path, body] of writes) {
				const res = await c.request(method, records(shaft, path), body);
				expect([who, method, path, res.status]).toEqual([who, method, path, 403]);
				expect((await res.json()).error.code).toBe('forbidden');
			}
			const upload = await attach(c, shaft, 'pump-room.png', tinyPng(), 'image/png');
			expect([who, 'attachment', upload.status]).toEqual([who, 'attachment', 403]);
		}
		expect(counts(shaft)).toEqual(before);
	});

	it('a technician of the vessel writes every kind of record', async () => {
		const shaft = shaftOf('corrin-bay/stbd');
		const before = counts(shaft);
		let sealId = 0;
		for (const [method, path, body] of writes) {
			const res = await tech.request(method, records(shaft, path), body);
			expect([method, path, res.status]).toEqual([method, path, method === 'PUT' ? 200 : 201]);
			if (path === '/seal-tests') sealId = (await res.json()).seal_test.id;
		}
		expect((await attach(tech, shaft, 'stbd.png', tinyPng(), 'image/png')).status).toBe(201);
		expect(counts(shaft)).toEqual({
			seal_tests: before.seal_tests + 1,
			bearing_measurements: before.bearing_measurements + 1,
			wear_readings: before.wear_readings + 1,
			wear_limits: 1,
			shrink_fit_plans: before.shrink_fit_plans + 1,
			record_attachments: before.record_attachments + 1
		});
		const all = await (await tech.get(records(shaft))).json();
		expect(all.seal_tests.find((t: { id: number }) => t.id === sealId)?.recorded_by).toBe(
			'tech@demo.test'
		);
	});

	it('a chief engineer of other vessels finds no hallow-tern shaft, to read or to write', async () => {
		const shaft = shaftOf('hallow-tern/main');
		const before = counts(shaft);
		for (const path of [...reads, `/attachments/1`]) {
			const res = await chief.get(records(shaft, path));
			expect([path, res.status]).toEqual([path, 404]);
		}
		for (const [method, path, body] of writes) {
			const res = await chief.request(method, records(shaft, path), body);
			expect([method, path, res.status]).toEqual([method, path, 404]);
			expect((await res.json()).error.code).toBe('not_found');
		}
		expect((await attach(chief, shaft, 'x.png', tinyPng(), 'image/png')).status).toBe(404);
		expect(counts(shaft)).toEqual(before);
		// while the technician who sails on her reads them
		expect((await tech.get(records(shaft))).status).toBe(200);
	});

	it('signed out: 401 for reading and writing', async () => {
		const anon = client(server.url);
		const shaft = shaftOf('corrin-bay/port');
		const before = counts(shaft);
		for (const path of reads)
			expect([path, (await anon.get(records(shaft, path))).status]).toEqual([path, 401]);
		for (const [method, path, body] of writes) {
			const res = await anon.request(method, records(shaft, path), body);
			expect([method, path, res.status]).toEqual([method, path, 401]);
		}
		expect((await attach(anon, shaft, 'x.png', tinyPng(), 'image/png')).status).toBe(401);
		expect(counts(shaft)).toEqual(before);
	});
});

describe('the records page without script', () => {
	it('answers a refused form on the page of the same shaft, keeping what was typed', async () => {
		const { vessel, shaft } = ids['corrin-bay/stbd']; // the vessel's second shaft
		const before = counts(shaft);
		const body = new URLSearchParams({
			shaft_id: String(shaft),
			measured_at: '2026-11-20',
			reading: 'lots',
			notes: 'kept'
		});
		// the form's own action URL: the shaft stays in the query beside the action's name
		const res = await fetch(`${server.url}/vessels/${vessel}/records?shaft=${shaft}&/wear`, {
			method: 'POST',
			body,
			headers: {
				cookie: tech.cookie!,
				origin: server.env.ORIGIN,
				accept: 'text/html',
				'content-type': 'application/x-www-form-urlencoded'
			}
		});
		expect(res.status).toBe(400);
		const html = await res.text();
		const form = html.slice(
			html.indexOf('data-testid="form-wear"'),
			html.indexOf('</form>', html.indexOf('data-testid="form-wear"'))
		);
		expect(form).toContain(`name="shaft_id" value="${shaft}"`);
		expect(form).toMatch(/class="field-error"/);
		expect(form).toContain('value="lots"');
		expect(counts(shaft)).toEqual(before);
	});

	it('an attachment sent without a file says so and keeps the notes typed', async () => {
		const { vessel, shaft } = ids['corrin-bay/stbd'];
		const body = new FormData();
		body.set('shaft_id', String(shaft));
		body.set('notes', 'photo of the aft seal to follow');
		body.set('file', new File([], '')); // no file chosen
		const res = await fetch(`${server.url}/vessels/${vessel}/records?shaft=${shaft}&/attachment`, {
			method: 'POST',
			body,
			headers: { cookie: tech.cookie!, origin: server.env.ORIGIN, accept: 'text/html' }
		});
		expect(res.status).toBe(400);
		const html = await res.text();
		const form = html.slice(html.indexOf('data-testid="form-attachment"'), html.indexOf('</form>', html.indexOf('data-testid="form-attachment"')));
		expect(form).toMatch(/class="field-error"/);
		expect(form).toContain('photo of the aft seal to follow');
	});
});
