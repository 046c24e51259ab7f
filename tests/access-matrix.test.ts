/**
 * The role × route matrix over every API route of the built app: each role is
 * allowed (any answer but 401/403/404), forbidden (403), outside its vessel
 * scope (404), or signed out (401) exactly as the permission table says. A
 * route added without a row here fails the completeness check.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import type { Role } from '$lib/types';
import { startServer, type TestServer } from './helpers/server';
import { client, signIn, type Client } from './helpers/http';
import { connectGateway } from './helpers/gateway';
import { publishSeries, steady } from './helpers/series';

type Ids = {
	vessel: number;
	shaft: number;
	alarm: number;
	importId: number;
	attachment: number;
	user: string;
	token: number;
	mail: number;
};

interface RouteCase {
	route: string; // "METHOD /api/… as the file tree names it"
	/** who may: roles, 'any' signed-in user, or 'public' (no sign-in) */
	who: Role[] | 'any' | 'public';
	/** the path names a vessel (or something of one): on-board roles outside it get 404 */
	scoped?: boolean;
	body?: unknown;
	/** answered with a stream (SSE): only the status is read */
	stream?: boolean;
}

const ADMIN: Role[] = ['admin'];
const ONBOARD_ACTORS: Role[] = ['admin', 'fleet_manager', 'chief_engineer', 'technician'];
const RECORD_WRITERS: Role[] = ['admin', 'chief_engineer', 'technician'];

/** Bodies are deliberately invalid where the route changes things: an allowed caller gets 4xx from validation, never a change. */
const CASES: RouteCase[] = [
	{ route: 'GET /api/health', who: 'public' },
	{ route: 'POST /api/auth/login', who: 'public', body: {} },
	{ route: 'POST /api/account/password-reset', who: 'public', body: {} },
	{ route: 'POST /api/account/password-reset/confirm', who: 'public', body: {} },
	{ route: 'POST /api/account/invitation/accept', who: 'public', body: {} },
	{ route: 'GET /api/me', who: 'any' },
	{ route: 'PUT /api/me/password', who: 'any', body: {} },
	{ route: 'GET /api/me/preferences', who: 'any' },
	{ route: 'PUT /api/me/preferences', who: 'any', body: { units: 'imperial-ish' } },
	{ route: 'GET /api/me/tokens', who: 'any' },
	{ route: 'POST /api/me/tokens', who: 'any', body: {} },
	{ route: 'DELETE /api/me/tokens/[tokenId=id]', who: 'any' },
	{ route: 'GET /api/users', who: ADMIN },
	{ route: 'POST /api/users', who: ADMIN, body: {} },
	{ route: 'PATCH /api/users/[userId]', who: ADMIN, body: { role: 'captain' } },
	{ route: 'POST /api/users/[userId]/password-reset', who: ADMIN },
	{ route: 'GET /api/admin/mail/sink', who: ADMIN },
	{ route: 'GET /api/admin/mail/sink/[mailId=id]', who: ADMIN },
	{ route: 'GET /api/admin/mail/outbox', who: ADMIN },
	{ route: 'POST /api/admin/mail/outbox/[mailId=id]/retry', who: ADMIN },
	{ route: 'GET /api/vessels', who: 'any' },
	{ route: 'POST /api/vessels', who: ADMIN, body: {} },
	{ route: 'GET /api/vessels/[vesselId=id]', who: 'any', scoped: true },
	{
		route: 'PATCH /api/vessels/[vesselId=id]',
		who: ADMIN,
		scoped: true,
		body: { time_zone: 'Nowhere/Land' }
	},
	{ route: 'POST /api/vessels/[vesselId=id]/shafts', who: ADMIN, scoped: true, body: {} },
	{ route: 'GET /api/vessels/[vesselId=id]/gateway', who: ADMIN, scoped: true },
	{ route: 'POST /api/vessels/[vesselId=id]/gateway', who: ADMIN, scoped: true },
	{
		route: 'PUT /api/vessels/[vesselId=id]/operating-mode',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/vessels/[vesselId=id]/alarm-settings', who: 'any', scoped: true },
	{
		route: 'PUT /api/vessels/[vesselId=id]/alarm-settings',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: { separator_dp_max_bar: -5 }
	},
	{
		route: 'PUT /api/vessels/[vesselId=id]/out-of-service',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/vessels/[vesselId=id]/notification-settings', who: 'any', scoped: true },
	{
		route: 'PUT /api/vessels/[vesselId=id]/notification-settings',
		who: ['admin', 'fleet_manager', 'chief_engineer'],
		scoped: true,
		body: { escalation_after_s: -1 }
	},
	{ route: 'GET /api/vessels/[vesselId=id]/purge-schedule', who: 'any', scoped: true },
	{
		route: 'PUT /api/vessels/[vesselId=id]/purge-schedule',
		who: ['admin', 'chief_engineer', 'technician'],
		scoped: true,
		body: {}
	},
	{
		route: 'POST /api/vessels/[vesselId=id]/purge',
		who: ['admin', 'chief_engineer', 'technician'],
		scoped: true,
		body: { duration_s: -1 }
	},
	{ route: 'GET /api/vessels/[vesselId=id]/purges', who: 'any', scoped: true },
	{ route: 'GET /api/vessels/[vesselId=id]/live', who: 'any', scoped: true, stream: true },
	{ route: 'GET /api/live', who: 'any', stream: true },
	{ route: 'GET /api/shafts/[shaftId=id]', who: 'any', scoped: true },
	{ route: 'PATCH /api/shafts/[shaftId=id]', who: ADMIN, scoped: true, body: { diameter_mm: -1 } },
	{ route: 'GET /api/shafts/[shaftId=id]/status', who: 'any', scoped: true },
	{ route: 'GET /api/shafts/[shaftId=id]/alarm-settings', who: 'any', scoped: true },
	{
		route: 'PUT /api/shafts/[shaftId=id]/alarm-settings',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: { margin_warning: -1 }
	},
	{
		route: 'PUT /api/shafts/[shaftId=id]/out-of-service',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/shafts/[shaftId=id]/samples', who: 'any', scoped: true },
	{ route: 'GET /api/shafts/[shaftId=id]/compliance', who: 'any', scoped: true },
	{ route: 'GET /api/shafts/[shaftId=id]/export.csv', who: 'any', scoped: true },
	{ route: 'GET /api/shafts/[shaftId=id]/imports', who: 'any', scoped: true },
	{
		route: 'POST /api/shafts/[shaftId=id]/imports',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/shafts/[shaftId=id]/imports/[importId=id]', who: 'any', scoped: true },
	{
		route: 'DELETE /api/shafts/[shaftId=id]/imports/[importId=id]',
		who: ['admin', 'chief_engineer'],
		scoped: true
	},
	{
		route: 'POST /api/shafts/[shaftId=id]/imports/[importId=id]/preview',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: { mapping: 'nonsense' }
	},
	{
		route: 'POST /api/shafts/[shaftId=id]/imports/[importId=id]/commit',
		who: ['admin', 'chief_engineer'],
		scoped: true,
		body: { mapping: 'nonsense' }
	},
	{
		route: 'GET /api/shafts/[shaftId=id]/imports/[importId=id]/original',
		who: 'any',
		scoped: true
	},
	{ route: 'GET /api/shafts/[shaftId=id]/records', who: 'any', scoped: true },
	{ route: 'GET /api/shafts/[shaftId=id]/records/seal-tests', who: 'any', scoped: true },
	{
		route: 'POST /api/shafts/[shaftId=id]/records/seal-tests',
		who: RECORD_WRITERS,
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/shafts/[shaftId=id]/records/bearing-measurements', who: 'any', scoped: true },
	{
		route: 'POST /api/shafts/[shaftId=id]/records/bearing-measurements',
		who: RECORD_WRITERS,
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/shafts/[shaftId=id]/records/wear', who: 'any', scoped: true },
	{
		route: 'POST /api/shafts/[shaftId=id]/records/wear',
		who: RECORD_WRITERS,
		scoped: true,
		body: { reading_mm: 'x' }
	},
	{
		route: 'PUT /api/shafts/[shaftId=id]/records/wear-limit',
		who: RECORD_WRITERS,
		scoped: true,
		body: { wear_limit_mm: -1 }
	},
	{ route: 'GET /api/shafts/[shaftId=id]/records/shrink-fits', who: 'any', scoped: true },
	{
		route: 'POST /api/shafts/[shaftId=id]/records/shrink-fits',
		who: RECORD_WRITERS,
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/shafts/[shaftId=id]/records/attachments', who: 'any', scoped: true },
	{
		route: 'POST /api/shafts/[shaftId=id]/records/attachments',
		who: RECORD_WRITERS,
		scoped: true,
		body: {}
	},
	{
		route: 'GET /api/shafts/[shaftId=id]/records/attachments/[attachmentId=id]',
		who: 'any',
		scoped: true
	},
	{
		route: 'POST /api/shafts/[shaftId=id]/records/[kind=recordkind]/[recordId=id]/void',
		who: RECORD_WRITERS,
		scoped: true,
		body: {}
	},
	{ route: 'GET /api/compliance', who: 'any' },
	{ route: 'GET /api/alarms', who: 'any' },
	{ route: 'GET /api/alarms/[alarmId=id]', who: 'any', scoped: true },
	{
		route: 'POST /api/alarms/[alarmId=id]/ack',
		who: ONBOARD_ACTORS,
		scoped: true,
		body: { comment: 42 }
	},
	{
		route: 'POST /api/alarms/[alarmId=id]/shelve',
		who: ONBOARD_ACTORS,
		scoped: true,
		body: { duration_s: 1 }
	},
	{
		route: 'POST /api/alarms/[alarmId=id]/unshelve',
		who: ONBOARD_ACTORS,
		scoped: true,
		body: { comment: 42 }
	},
	// last: ends the caller's session
	{ route: 'POST /api/auth/logout', who: 'any' }
];

const ROLES: [Role, string][] = [
	['admin', 'admin@demo.test'],
	['fleet_manager', 'fleet@demo.test'],
	['chief_engineer', 'chief@demo.test'], // corrin-bay and skerry-lark
	['technician', 'tech@demo.test'], // corrin-bay and hallow-tern
	['shore_office', 'shore@demo.test']
];
const ONBOARD: Role[] = ['chief_engineer', 'technician'];

let server: TestServer;
const clients = new Map<Role, Client>();
let inScope: Ids; // corrin-bay: both on-board demo users are members
let outOfScope: Ids; // lakeline-wren: neither is

function path(route: string, ids: Ids) {
	return route
		.split(' ')[1]
		.replace('[vesselId=id]', String(ids.vessel))
		.replace('[shaftId=id]', String(ids.shaft))
		.replace('[alarmId=id]', String(ids.alarm))
		.replace('[importId=id]', String(ids.importId))
		.replace('[attachmentId=id]', String(ids.attachment))
		.replace('[kind=recordkind]', 'attachments')
		.replace('[recordId=id]', String(ids.attachment))
		.replace('[userId]', ids.user)
		.replace('[tokenId=id]', String(ids.token))
		.replace('[mailId=id]', String(ids.mail));
}

async function call(c: Client | null, kase: RouteCase, ids: Ids): Promise<number> {
	const method = kase.route.split(' ')[0];
	const url = path(kase.route, ids);
	if (kase.stream) {
		const abort = new AbortController();
		const res = await fetch(server.url + url, {
			headers: c?.cookie ? { cookie: c.cookie } : {},
			signal: abort.signal
		});
		abort.abort();
		return res.status;
	}
	const res = await (c ?? client(server.url)).request(method, url, kase.body);
	await res.arrayBuffer();
	return res.status;
}

async function idsFor(
	vesselCode: string,
	shaftCode: string,
	admin: Client
): Promise<Omit<Ids, 'user' | 'token' | 'mail'>> {
	const vessels = (await (await admin.get('/api/vessels')).json()).vessels as {
		id: number;
		code: string;
		shafts: { id: number; code: string }[];
	}[];
	const v = vessels.find((x) => x.code === vesselCode)!;
	const shaft = v.shafts.find((s) => s.code === shaftCode)!.id;
	const alarms = (await (await admin.get(`/api/alarms?vessel=${v.id}`)).json()).alarms as {
		id: number;
		shaft_id: number;
	}[];
	const alarm = alarms.find((a) => a.shaft_id === shaft)!.id;
	return {
		vessel: v.id,
		shaft,
		alarm,
		importId: await uploadTo(shaft, admin),
		attachment: await attachTo(shaft, admin)
	};
}

/** a small PNG attached to the shaft's records */
async function attachTo(shaft: number, admin: Client): Promise<number> {
	const png = new Uint8Array([
		0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52
	]);
	const res = await fetch(
		`${server.url}/api/shafts/${shaft}/records/attachments?filename=matrix.png`,
		{
			method: 'POST',
			body: png,
			headers: { cookie: admin.cookie!, 'content-type': 'image/png' }
		}
	);
	return (await res.json()).attachment.id as number;
}

/** a small logger file uploaded (not imported) for the shaft */
async function uploadTo(shaft: number, admin: Client): Promise<number> {
	const csv = 'time,flow\n2026-11-30T10:00:00Z,80\n';
	const up = await admin.request('POST', `/api/shafts/${shaft}/imports?filename=matrix.csv`, csv, {
		'content-type': 'text/csv'
	});
	return (await up.json()).import.id as number;
}

beforeAll(async () => {
	server = await startServer();
	for (const [role, email] of ROLES) clients.set(role, await signIn(server.url, email));
	const admin = clients.get('admin')!;
	// an open low-flow alarm on each vessel used below
	for (const [vessel, shaft] of [
		['corrin-bay', 'port'],
		['lakeline-wren', 'port']
	]) {
		const gw = await connectGateway(server.mqttPort, vessel);
		await publishSeries(gw, vessel, shaft, Date.now() - 60_000, steady(0, 20, { flow_lpm: 1 }));
		gw.end();
	}
	await new Promise((r) => setTimeout(r, 1500));
	const extra = await (
		await admin.post('/api/users', {
			email: 'matrix@demo.test',
			name: 'Matrix',
			role: 'shore_office'
		})
	).json();
	// the invitation just sent is in the local sink
	await new Promise((r) => setTimeout(r, 1000));
	const { messages } = (await (await admin.get('/api/admin/mail/sink')).json()) as {
		messages: { id: number }[];
	};
	const mailId = messages[0].id;
	const a = await idsFor('corrin-bay', 'port', admin);
	const b = await idsFor('lakeline-wren', 'port', admin);
	inScope = { ...a, user: extra.user.id, token: 0, mail: mailId };
	outOfScope = { ...b, user: extra.user.id, token: 0, mail: mailId };
});
afterAll(() => server?.stop());

describe('completeness', () => {
	it('every API route and method has a row in the matrix', () => {
		const root = resolve(import.meta.dirname, '../src/routes');
		const found: string[] = [];
		const walk = (dir: string) => {
			for (const name of readdirSync(dir)) {
				const p = join(dir, name);
				if (statSync(p).isDirectory()) walk(p);
				else if (name === '+server.ts') {
					const route = '/' + relative(root, dir).split('\\').join('/');
					for (const m of readFileSync(p, 'utf8').matchAll(
						/export const (GET|POST|PUT|PATCH|DELETE)\b/g
					))
						found.push(`${m[1]} ${route}`);
				}
			}
		};
		walk(join(root, 'api'));
		expect(found.sort()).toEqual(CASES.map((c) => c.route).sort());
	});
});

describe.each(CASES)('$route', (kase) => {
	it('answers each role as the permission table says', async () => {
		// a fresh token per caller for the token route
		const results: Record<string, number> = {};
		const expected: Record<string, string> = {};
		for (const [role] of ROLES) {
			const c =
				kase.route === 'POST /api/auth/logout'
					? await signIn(server.url, ROLES.find((r) => r[0] === role)![1])
					: clients.get(role)!;
			const ids = { ...inScope };
			const out = { ...outOfScope };
			if (kase.route.includes('[tokenId=id]')) {
				ids.token = out.token = (
					await (await c.post('/api/me/tokens', { name: 'matrix' })).json()
				).id;
			}
			if (kase.route === 'DELETE /api/shafts/[shaftId=id]/imports/[importId=id]') {
				// an allowed delete really deletes: each caller gets uploads of its own
				ids.importId = await uploadTo(inScope.shaft, clients.get('admin')!);
				out.importId = await uploadTo(outOfScope.shaft, clients.get('admin')!);
			}
			const allowed = kase.who === 'any' || kase.who === 'public' || kase.who.includes(role);
			results[role] = await call(c, kase, ids);
			expected[role] = allowed ? 'allowed' : '403';
			if (kase.scoped && ONBOARD.includes(role)) {
				results[`${role} outside scope`] = await call(c, kase, out);
				expected[`${role} outside scope`] = '404';
			}
		}
		results['signed out'] = await call(null, kase, inScope);
		expected['signed out'] = kase.who === 'public' ? 'allowed' : '401';
		const verdict = Object.fromEntries(
			Object.entries(results).map(([k, status]) => [
				k,
				[401, 403, 404].includes(status) ? String(status) : 'allowed'
			])
		);
		expect(verdict).toEqual(expected);
	});
});

describe('nested ids', () => {
	it('an upload is reachable only under its own shaft', async () => {
		const admin = clients.get('admin')!;
		const res = await admin.get(`/api/shafts/${inScope.shaft}/imports/${outOfScope.importId}`);
		expect(res.status).toBe(404);
		expect(
			(await admin.get(`/api/shafts/${outOfScope.shaft}/imports/${outOfScope.importId}`)).status
		).toBe(200);
	});
});
