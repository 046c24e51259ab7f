/**
 * The purge API over HTTP, against the built app: who may read and change a separator's
 * schedule (vessel scope answers 404, role 403), validation naming the field at fault, the
 * schedule with its next runs, "purge now" and the list of commands, and the separator page.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { startServer, type TestServer } from './helpers/server';
import { postForm, signIn, type Client } from './helpers/http';

let server: TestServer;
let tech: Client; // technician of corrin-bay and hallow-tern only
let shore: Client;
let chief: Client; // chief engineer of corrin-bay and skerry-lark
const ids: Record<string, number> = {};

const body = {
	enabled: true,
	interval_min: 240,
	duration_s: 25,
	offset_min: 30,
	quiet_hours: [{ from: '22:00', to: '06:00' }],
	reason: 'silt in the river approach'
};

beforeAll(async () => {
	server = await startServer();
	tech = await signIn(server.url, 'tech@demo.test');
	shore = await signIn(server.url, 'shore@demo.test');
	chief = await signIn(server.url, 'chief@demo.test');
	const res = await shore.get('/api/vessels');
	for (const v of (await res.json()).vessels as { id: number; code: string }[]) ids[v.code] = v.id;
});
afterAll(async () => {
	await server?.stop();
});

const schedulePath = (code: string) => `/api/vessels/${ids[code]}/purge-schedule`;

describe('vessel scope and roles', () => {
	it('a technician of another vessel gets 404 for this vessel’s schedule, purge and purges', async () => {
		for (const code of ['lakeline-wren', 'skerry-lark']) {
			expect((await tech.get(schedulePath(code))).status).toBe(404);
			expect((await tech.put(schedulePath(code), body)).status).toBe(404);
			expect((await tech.post(`/api/vessels/${ids[code]}/purge`, { duration_s: 5 })).status).toBe(
				404
			);
			expect((await tech.get(`/api/vessels/${ids[code]}/purges`)).status).toBe(404);
			expect((await tech.get(`/vessels/${ids[code]}/separator`)).status).toBe(404);
		}
		const res = await tech.put(schedulePath('lakeline-wren'), body);
		expect(await res.json()).toEqual({ error: { code: 'not_found', message: 'not found' } });
	});

	it('shore office may read the schedule but gets 403 on PUT and on purge now', async () => {
		expect((await shore.get(schedulePath('lakeline-wren'))).status).toBe(200);
		const put = await shore.put(schedulePath('lakeline-wren'), body);
		expect(put.status).toBe(403);
		expect((await put.json()).error.code).toBe('forbidden');
		expect((await shore.post(`/api/vessels/${ids['lakeline-wren']}/purge`, {})).status).toBe(403);
	});

	it('signed out: 401', async () => {
		const res = await fetch(`${server.url}${schedulePath('corrin-bay')}`);
		expect(res.status).toBe(401);
	});
});

describe('GET and PUT /api/vessels/{id}/purge-schedule', () => {
	it('gives the schedule, in words, with the next 10 runs as ISO 8601 times', async () => {
		const res = await tech.get(schedulePath('hallow-tern'));
		expect(res.status).toBe(200);
		const view = await res.json();
		expect(view).toMatchObject({
			vessel_code: 'hallow-tern',
			time_zone: 'Asia/Singapore',
			configured: true,
			schedule: { enabled: true, interval_min: 15, duration_s: 30, offset_min: 5, quiet_hours: [] }
		});
		expect(view.next_runs).toHaveLength(10);
		const times = view.next_runs.map((t: string) => Date.parse(t));
		for (const t of view.next_runs) expect(t).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:00\.000Z$/);
		// Singapore is UTC+8 all year: every 15 min from :05 local is :05, :20, :35, :50 in UTC too
		for (const t of times) expect([5, 20, 35, 50]).toContain(new Date(t).getUTCMinutes());
		expect(times[1] - times[0]).toBe(15 * 60_000);
		expect(times[0]).toBeGreaterThan(Date.now() - 1000);
		expect(view.preview[0]).toMatchObject({ at: view.next_runs[0] });
		expect(view.preview[0].vessel_time).toMatch(/\+08:00$/);
		expect(view.description).toBe('Every 15 min from 00:05 to 23:50 (vessel time), purging 30 s.');
	});

	it('names the field at fault with 422, and 400 for a body that is not JSON', async () => {
		const cases: [Record<string, unknown>, string][] = [
			[{ ...body, interval_min: 10 }, 'interval_min'],
			[{ ...body, interval_min: 1441 }, 'interval_min'],
			[{ ...body, duration_s: 601 }, 'duration_s'],
			[{ ...body, duration_s: 2 }, 'duration_s'],
			[{ ...body, quiet_hours: [{ from: '25:00', to: '06:00' }] }, 'quiet_hours.0.from'],
			[{ ...body, quiet_hours: [{ from: '22:00', to: '6' }] }, 'quiet_hours.0.to'],
			[{ ...body, reason: ' ' }, 'reason'],
			[{ ...body, offset_min: 240 }, 'offset_min']
		];
		for (const [bad, field] of cases) {
			const res = await tech.put(schedulePath('corrin-bay'), bad);
			expect(res.status, field).toBe(422);
			const { error } = await res.json();
			expect(error.code).toBe('invalid');
			expect(Object.keys(error.fields), field).toEqual([field]);
			expect(error.message.startsWith(`${field}: `)).toBe(true);
		}
		const res = await tech.request('PUT', schedulePath('corrin-bay'), '{"enabled": tru');
		expect(res.status).toBe(400);
		// nothing of the refused changes was stored
		expect((await (await tech.get(schedulePath('corrin-bay'))).json()).schedule.interval_min).toBe(
			16
		);
	});

	it('stores a valid change, audited with the old and new values and the reason', async () => {
		const res = await tech.put(schedulePath('corrin-bay'), body);
		expect(res.status).toBe(200);
		const view = await res.json();
		const { reason: _, ...stored } = body;
		expect(view).toMatchObject({ changed: true, updated_by: 'tech@demo.test' });
		expect(view.schedule).toEqual(stored);
		expect(view.description).toMatch(
			/^Every 4 h at 00:30, 04:30, .* none between 22:00 and 06:00, so 00:30 and 04:30 are skipped\.$/
		);
		expect(view.next_runs).toHaveLength(10);

		const sqlite = new Database(server.dbPath, { readonly: true });
		try {
			const row = sqlite
				.prepare(
					`select actor, details from audit_log where action = 'purge.schedule.update' and vessel_id = ? order by id desc limit 1`
				)
				.get(ids['corrin-bay']) as { actor: string; details: string };
			expect(row.actor).toBe('tech@demo.test');
			expect(JSON.parse(row.details)).toMatchObject({
				reason: 'silt in the river approach',
				before: { interval_min: 16, duration_s: 20, offset_min: 2, quiet_hours: [] },
				after: stored
			});
		} finally {
			sqlite.close();
		}
	});
});

describe('POST /api/vessels/{id}/purge and GET …/purges', () => {
	let commandId: string;

	it('a purge asked with the session cookie from another site is refused (403) and sends nothing', async () => {
		const before = await (await tech.get(`/api/vessels/${ids['hallow-tern']}/purges`)).json();
		const hallow = `/api/vessels/${ids['hallow-tern']}/purge`;
		const foreign: Record<string, string>[] = [{ origin: 'http://192.168.1.20:8080' }, { 'sec-fetch-site': 'same-site' }, { 'sec-fetch-site': 'cross-site' }];
		for (const headers of foreign) {
			const res = await tech.request('POST', hallow, undefined, headers);
			expect(res.status).toBe(403);
			expect((await res.json()).error.code).toBe('forbidden');
		}
		const after = await (await tech.get(`/api/vessels/${ids['hallow-tern']}/purges`)).json();
		expect(after.purges).toEqual(before.purges);
		// from the app's own origin the request goes through (to the duration check)
		const own = await tech.request('POST', hallow, { duration_s: 4 }, { origin: new URL(server.url).origin });
		expect(own.status).toBe(422);
	});

	it('purge now answers 201 with the pending command; a second one at once is 409', async () => {
		const res = await chief.post(`/api/vessels/${ids['skerry-lark']}/purge`, { duration_s: 12 });
		expect(res.status).toBe(201);
		const { command } = await res.json();
		expect(command).toMatchObject({
			requested_by: 'chief@demo.test',
			source: 'manual',
			duration_s: 12,
			outcome: 'pending'
		});
		commandId = command.id;
		const again = await chief.post(`/api/vessels/${ids['skerry-lark']}/purge`, {});
		expect(again.status).toBe(409);
		expect((await again.json()).error.code).toBe('purge_in_progress');
	});

	it('refuses a duration outside the schedule’s bounds with 422 on duration_s', async () => {
		const res = await tech.post(`/api/vessels/${ids['hallow-tern']}/purge`, { duration_s: 4 });
		expect(res.status).toBe(422);
		expect(Object.keys((await res.json()).error.fields)).toEqual(['duration_s']);
	});

	it('a `to` at the first instant a Date holds lists nothing, and is no failure', async () => {
		// −8.64e15 ms, the earliest time value (ECMA-262 §21.4.1.1): the default from (a day before) is held there
		const res = await chief.get(`/api/vessels/${ids['skerry-lark']}/purges?to=-8640000000000000`);
		expect(res.status).toBe(200);
		expect((await res.json()).purges).toEqual([]);
	});

	it('lists the commands with id, time, who asked and outcome; from/to as ISO 8601 or epoch ms', async () => {
		const res = await chief.get(`/api/vessels/${ids['skerry-lark']}/purges`);
		expect(res.status).toBe(200);
		const list = await res.json();
		const mine = list.purges.find((p: { id: string }) => p.id === commandId);
		expect(mine).toMatchObject({
			id: commandId,
			requested_by: 'chief@demo.test',
			outcome: 'pending'
		});
		expect(Date.parse(mine.requested_at)).toBeGreaterThan(Date.now() - 60_000);

		const from = Date.parse(mine.requested_at) - 1;
		const byMs = await (
			await chief.get(
				`/api/vessels/${ids['skerry-lark']}/purges?from=${from}&to=${Date.now() + 1000}`
			)
		).json();
		expect(byMs.purges.map((p: { id: string }) => p.id)).toContain(commandId);
		const before = new Date(from - 3_600_000).toISOString();
		const none = await (
			await chief.get(`/api/vessels/${ids['skerry-lark']}/purges?to=${encodeURIComponent(before)}`)
		).json();
		expect(none.purges.map((p: { id: string }) => p.id)).not.toContain(commandId);
		expect(
			(await chief.get(`/api/vessels/${ids['skerry-lark']}/purges?from=yesterday`)).status
		).toBe(400);
		// a number of ms no Date can hold is a bad query, not a server error
		const far = await chief.get(`/api/vessels/${ids['skerry-lark']}/purges?to=99999999999999999`);
		expect(far.status).toBe(400);
		expect((await far.json()).error.fields).toHaveProperty('to');
	});
});

describe('the separator page', () => {
	it('shows the schedule in words, the next runs, the discharge caution and purge now', async () => {
		const res = await tech.get(`/vessels/${ids['corrin-bay']}/separator`);
		expect(res.status).toBe(200);
		const html = await res.text();
		expect(html).toContain('Every 4 h at 00:30');
		expect(html).toContain('data-testid="next-runs"');
		expect(html).toContain('no-discharge areas');
		expect(html).toMatch(/opens by remote command[\s\S]*lock it out/);
		expect(html).toContain('Purge now');
		expect(html).toContain('Change the schedule');
	});

	it('shows shore office no form and no purge now', async () => {
		const html = await (await shore.get(`/vessels/${ids['corrin-bay']}/separator`)).text();
		expect(html).toContain('Every 4 h at 00:30');
		expect(html).not.toContain('Change the schedule');
		expect(html).not.toContain('Purge now…');
	});

	/** A form action's raw JSON answer: `data` stays devalue text, which the checks search as text. */
	async function action(c: Client, code: string, name: string, fields: [string, string][]) {
		const path = `/vessels/${ids[code]}/separator?/${name}`;
		const res = await postForm(c, server.env.ORIGIN, path, new URLSearchParams(fields));
		return (await res.json()) as { type: string; status?: number; data?: string };
	}

	it('the schedule form refuses bad values with the field at fault, and saves good ones', async () => {
		const fields: [string, string][] = [
			['enabled', 'on'],
			['interval_min', '10'],
			['duration_s', '20'],
			['offset_min', '0'],
			['quiet_from', '23:00'],
			['quiet_to', '05:00'],
			['reason', 'tidal silt']
		];
		const bad = await action(tech, 'hallow-tern', 'schedule', fields);
		expect(bad).toMatchObject({ type: 'failure', status: 422 });
		expect(bad.data).toContain('interval_min');
		expect(bad.data).toContain('at least 15 min');

		const good = await action(
			tech,
			'hallow-tern',
			'schedule',
			fields.map(([k, v]) => [k, k === 'interval_min' ? '60' : v])
		);
		expect(good).toMatchObject({ type: 'success' });
		const view = await (await tech.get(schedulePath('hallow-tern'))).json();
		expect(view.schedule).toEqual({
			enabled: true,
			interval_min: 60,
			duration_s: 20,
			offset_min: 0,
			quiet_hours: [{ from: '23:00', to: '05:00' }]
		});
	});

	it('purge now from the page sends a command; shore office is refused', async () => {
		const refused = await action(shore, 'hallow-tern', 'purge', [['duration_s', '10']]);
		expect(refused).toMatchObject({ type: 'failure', status: 403 });
		const sent = await action(tech, 'hallow-tern', 'purge', [['duration_s', '10']]);
		expect(sent).toMatchObject({ type: 'success' });
		const list = await (await tech.get(`/api/vessels/${ids['hallow-tern']}/purges`)).json();
		expect(list.purges[0]).toMatchObject({
			requested_by: 'tech@demo.test',
			duration_s: 10,
			source: 'manual'
		});
	});
});
