/**
 * The live streams over real HTTP from the built app: the snapshot first,
 * batched samples from the real broker, alarm changes, scope, resuming with
 * Last-Event-ID, and resuming across a server restart.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from './helpers/server';
import { signIn, type Client } from './helpers/http';
import { connectGateway, telemetry } from './helpers/gateway';
import { openSse } from './helpers/sse';

let server: TestServer;
let chief: Client;
let corrinBay: number;
let portShaft: number;

beforeAll(async () => {
	server = await startServer();
	chief = await signIn(server.url, 'chief@demo.test');
	const vessels = (await (await chief.get('/api/vessels')).json()).vessels as { id: number; code: string; shafts: { id: number; code: string }[] }[];
	const v = vessels.find((x) => x.code === 'corrin-bay')!;
	corrinBay = v.id;
	portShaft = v.shafts.find((s) => s.code === 'port')!.id;
});
afterAll(() => server?.stop());

const live = (path: string, c: Client, headers: Record<string, string> = {}) =>
	openSse(server.url + path, { cookie: c.cookie!, ...headers });

describe('vessel stream', () => {
	it('sends the recent window first, then samples as they arrive', async () => {
		const gw = await connectGateway(server.mqttPort, 'corrin-bay');
		const before = Date.now() - 30_000;
		await gw.publishAsync(telemetry('corrin-bay', 'port'), JSON.stringify({ ts: before, flow_lpm: 101.5 }), { qos: 1 });
		await new Promise((r) => setTimeout(r, 500)); // committed before the snapshot is read
		const sse = await live(`/api/vessels/${corrinBay}/live?window=5`, chief);
		expect(sse.status).toBe(200);
		const snap = JSON.parse((await sse.next((e) => e.event === 'snapshot', { since: 0 })).data);
		expect(snap.vessel_id).toBe(corrinBay);
		expect(snap.shafts[portShaft]).toContainEqual([before, 101.5, null, null, null]);

		const ts = Date.now();
		await gw.publishAsync(telemetry('corrin-bay', 'port'), JSON.stringify({ ts, flow_lpm: 97.25, supply_bar: 1.1 }), { qos: 1 });
		const batch = await sse.next((e) => e.event === 'samples' && e.data.includes(String(ts)), { since: 0 });
		expect(JSON.parse(batch.data).shafts[portShaft]).toContainEqual([ts, 97.25, 1.1, null, null]);
		sse.close();
		gw.end();
	});

	it('resumes from Last-Event-ID without a gap', async () => {
		const gw = await connectGateway(server.mqttPort, 'corrin-bay');
		const first = await live(`/api/vessels/${corrinBay}/live`, chief);
		const t1 = Date.now() - 2000;
		await gw.publishAsync(telemetry('corrin-bay', 'stbd'), JSON.stringify({ ts: t1, flow_lpm: 80 }), { qos: 1 });
		await first.next((e) => e.event === 'samples' && e.data.includes(String(t1)), { since: 0 });
		const lastId = first.lastEventId()!;
		first.close();
		const t2 = Date.now() - 1000;
		await gw.publishAsync(telemetry('corrin-bay', 'stbd'), JSON.stringify({ ts: t2, flow_lpm: 81 }), { qos: 1 });
		await new Promise((r) => setTimeout(r, 300));
		const again = await live(`/api/vessels/${corrinBay}/live`, chief, { 'last-event-id': lastId });
		const resumed = await again.next((e) => e.data.includes(String(t2)), { since: 0 });
		expect(resumed.event).toBe('samples');
		expect(again.events.some((e) => e.event === 'snapshot')).toBe(false);
		again.close();
		gw.end();
	});

	it('is 404 for a technician of other vessels, and 401 signed out', async () => {
		const tech = await signIn(server.url, 'tech@demo.test'); // corrin-bay and hallow-tern only
		const vessels = (await (await chief.get('/api/vessels')).json()).vessels as { id: number; code: string }[];
		const skerry = vessels.find((v) => v.code === 'skerry-lark')!.id;
		const denied = await live(`/api/vessels/${skerry}/live`, tech);
		expect(denied.status).toBe(404);
		const anon = await fetch(`${server.url}/api/vessels/${skerry}/live`);
		expect(anon.status).toBe(401);
	});
});

describe('fleet stream', () => {
	it('sends alarm changes of visible vessels and a summary every second', async () => {
		const sse = await live('/api/live', chief);
		await sse.next((e) => e.event === 'snapshot', { since: 0 });
		const fleet = JSON.parse((await sse.next((e) => e.event === 'fleet', { timeoutMs: 5000, since: 0 })).data);
		expect(Object.keys(fleet.vessels).map(Number)).toContain(corrinBay);
		// a low-flow alarm on corrin-bay port: 20 s of samples under the 63 L/min minimum
		const gw = await connectGateway(server.mqttPort, 'corrin-bay');
		const mark = sse.events.length;
		const t0 = Date.now(); // newer than anything published before, or the rules would not judge it
		for (let i = 0; i <= 20; i++) {
			await gw.publishAsync(telemetry('corrin-bay', 'port'), JSON.stringify({ ts: t0 + i * 1000, flow_lpm: 10 }), { qos: 1 });
		}
		const alarm = JSON.parse((await sse.next((e) => e.event === 'alarm' && e.data.includes('"low_flow"'), { since: mark })).data);
		expect(alarm.alarm).toMatchObject({ vessel_id: corrinBay, shaft_id: portShaft, type: 'low_flow', state: 'unacknowledged' });
		// the list can be asked for one ISA-18.2 state
		const ids = async (state: string) =>
			((await (await chief.get(`/api/alarms?state=${state}`)).json()).alarms as { id: number }[]).map((a) => a.id);
		expect(await ids('unacknowledged')).toContain(alarm.alarm.id);
		expect(await ids('shelved')).not.toContain(alarm.alarm.id);
		expect(await ids('active')).toContain(alarm.alarm.id);
		expect((await chief.get('/api/alarms?state=asleep')).status).toBe(400);
		// numbers in a URL are decimal digits: not hex, not exponents
		for (const limit of ['0x10', '1e3', '-1', '2.5']) expect((await chief.get(`/api/alarms?limit=${limit}`)).status, limit).toBe(400);
		expect((await chief.get('/api/alarms?limit=16')).status).toBe(200);
		sse.close();
		gw.end();
	});
});

describe('fleet state', () => {
	it('GET /api/vessels gives the separator reading with its ΔP alarm setpoint', async () => {
		const gw = await connectGateway(server.mqttPort, 'corrin-bay');
		await gw.publishAsync(`aftwater/v1/corrin-bay/separator/state`, JSON.stringify({ ts: Date.now(), dp_bar: 0.31, purge_valve: 'closed' }), { qos: 1 });
		let sep: { dp_bar: number; dp_max_bar: number } | null = null;
		for (let i = 0; i < 50 && !sep; i++) {
			const { vessels } = await (await chief.get('/api/vessels')).json();
			sep = vessels.find((v: { code: string }) => v.code === 'corrin-bay').separator;
			if (!sep) await new Promise((r) => setTimeout(r, 100));
		}
		// 0.8 bar: the setpoint's default (src/lib/alarms/settings.ts), not changed in this test
		expect(sep).toMatchObject({ dp_bar: 0.31, dp_max_bar: 0.8 });
		gw.end();
	});
});

describe('access changes', () => {
	it('a user taken off a vessel loses its open stream at once, and may not open it again', async () => {
		const admin = await signIn(server.url, 'admin@demo.test');
		const tech = await signIn(server.url, 'tech@demo.test'); // corrin-bay and hallow-tern
		const { users } = await (await admin.get('/api/users')).json();
		const techUser = users.find((u: { email: string }) => u.email === 'tech@demo.test');
		const hallow = (await (await admin.get('/api/vessels')).json()).vessels.find((v: { code: string }) => v.code === 'hallow-tern').id;
		const vesselStream = await live(`/api/vessels/${corrinBay}/live`, tech);
		const fleetStream = await live('/api/live', tech);
		await vesselStream.next((e) => e.event === 'snapshot', { since: 0 });
		await fleetStream.next((e) => e.event === 'snapshot', { since: 0 });

		const res = await admin.patch(`/api/users/${techUser.id}`, { vessel_ids: [hallow] });
		expect(res.status).toBe(200);
		await vesselStream.closed;
		await fleetStream.closed;
		expect((await live(`/api/vessels/${corrinBay}/live`, tech)).status).toBe(404);
		const fleetAgain = await live('/api/live', tech);
		const fleet = JSON.parse((await fleetAgain.next((e) => e.event === 'fleet', { timeoutMs: 5000, since: 0 })).data);
		expect(Object.keys(fleet.vessels).map(Number)).toEqual([hallow]);
		fleetAgain.close();
		await admin.patch(`/api/users/${techUser.id}`, { vessel_ids: techUser.vessel_ids });
	});
	it('signing out ends the streams of that session only; revoking a token ends the streams opened with it', async () => {
		const desk = await signIn(server.url, 'chief@demo.test');
		const tablet = await signIn(server.url, 'chief@demo.test');
		const deskStream = await live(`/api/vessels/${corrinBay}/live`, desk);
		const tabletStream = await live(`/api/vessels/${corrinBay}/live`, tablet);
		await deskStream.next((e) => e.event === 'snapshot', { since: 0 });
		await tabletStream.next((e) => e.event === 'snapshot', { since: 0 });
		let tabletEnded = false;
		void tabletStream.closed.then(() => (tabletEnded = true));

		const signedOutCookie = desk.cookie;
		expect((await desk.post('/api/auth/logout')).status).toBe(200);
		await deskStream.closed;
		expect((await live(`/api/vessels/${corrinBay}/live`, { ...desk, cookie: signedOutCookie })).status).toBe(401);
		// the other session of the same user keeps its stream: still open once a fleet summary has come
		const fleetTablet = await live('/api/live', tablet);
		await fleetTablet.next((e) => e.event === 'fleet', { timeoutMs: 5000, since: 0 });
		expect(tabletEnded).toBe(false);
		tabletStream.close();
		fleetTablet.close();

		const { token, id } = await (await tablet.post('/api/me/tokens', { name: 'bridge display' })).json();
		const byToken = await openSse(`${server.url}/api/live`, { authorization: `Bearer ${token}` });
		const byCookie = await live('/api/live', tablet);
		await byToken.next((e) => e.event === 'snapshot', { since: 0 });
		await byCookie.next((e) => e.event === 'snapshot', { since: 0 });
		let cookieEnded = false;
		void byCookie.closed.then(() => (cookieEnded = true));
		expect((await tablet.del(`/api/me/tokens/${id}`)).status).toBe(200);
		await byToken.closed;
		expect((await openSse(`${server.url}/api/live`, { authorization: `Bearer ${token}` })).status).toBe(401);
		await byCookie.next((e) => e.event === 'fleet', { timeoutMs: 5000, since: byCookie.events.length });
		expect(cookieEnded).toBe(false);
		byCookie.close();
	});
});

describe('across a restart', () => {
	it('a stream resumes after the server restarts, filling the gap from the database', async () => {
		const gw1 = await connectGateway(server.mqttPort, 'corrin-bay');
		const sse = await live(`/api/vessels/${corrinBay}/live`, chief);
		const t1 = Date.now() - 3000;
		await gw1.publishAsync(telemetry('corrin-bay', 'port'), JSON.stringify({ ts: t1, flow_lpm: 90 }), { qos: 1 });
		await sse.next((e) => e.data.includes(String(t1)), { since: 0 });
		const lastId = sse.lastEventId()!;
		gw1.end(true);
		await server.restart();
		await sse.closed;
		const gw2 = await connectGateway(server.mqttPort, 'corrin-bay');
		const t2 = Date.now() - 1000;
		await gw2.publishAsync(telemetry('corrin-bay', 'port'), JSON.stringify({ ts: t2, flow_lpm: 91 }), { qos: 1 });
		await new Promise((r) => setTimeout(r, 500));
		const again = await live(`/api/vessels/${corrinBay}/live`, await signIn(server.url, 'chief@demo.test'), { 'last-event-id': lastId });
		const fill = JSON.parse((await again.next((e) => e.event === 'backfill', { since: 0 })).data);
		expect(fill.shafts[portShaft]).toContainEqual([t2, 91, null, null, null]);
		again.close();
		gw2.end();
	});
});
