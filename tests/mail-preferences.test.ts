/**
 * GET/PUT /api/me/preferences and the settings page's form action: defaults,
 * validation that names the field at fault, units kept in users.units, and
 * alarm priority that on-board engineers cannot switch off. Also the admin
 * mail API's role check. Route modules are called directly with an event.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appUser, startTestApp, type TestApp } from './helpers/app';
import { routeEvent } from './helpers/route';
import * as users from '$lib/server/users/repository';
import { getPreferences } from '$lib/server/mail/preferences';
import * as prefsApi from '../src/routes/api/me/preferences/+server';
import * as sinkApi from '../src/routes/api/admin/mail/sink/+server';
import * as outboxApi from '../src/routes/api/admin/mail/outbox/+server';
import * as settingsPage from '../src/routes/(app)/settings/notifications/+page.server';
import * as adminMailPage from '../src/routes/(app)/admin/mail/+page.server';

let app: TestApp;

beforeAll(async () => {
	app = await startTestApp();
});
afterAll(async () => {
	await app?.stop();
});

const user = (email: string) => appUser(app.ctx, email);

const event = (method: string, u: users.AppUser, body?: unknown, path = '/api/me/preferences') =>
	routeEvent({ method, path, user: u, json: body, clientAddress: '192.0.2.9' });

const put = async (u: users.AppUser, body: unknown) => {
	const res = await prefsApi.PUT(event('PUT', u, body) as never);
	return { status: res.status, body: await res.json() };
};

describe('preferences API', () => {
	it('gives the defaults to a user who never saved any', async () => {
		const res = await prefsApi.GET(event('GET', await user('fleet@demo.test')) as never);
		expect(res.status).toBe(200);
		expect(await res.json()).toEqual({
			preferences: {
				units: 'metric',
				notify_priorities: ['alarm', 'warning'],
				digest_hour: null,
				quiet_hours: null,
				time_zone: 'UTC'
			}
		});
	});

	it('saves a full update, keeps units in users.units, and reads it back', async () => {
		const fleet = await user('fleet@demo.test');
		const body = {
			units: 'us',
			notify_priorities: ['caution', 'alarm'],
			digest_hour: 6,
			quiet_hours: { from: '22:30', to: '05:45' },
			time_zone: 'America/St_Johns'
		};
		const saved = await put(fleet, body);
		expect(saved.status).toBe(200);
		const expected = { ...body, notify_priorities: ['alarm', 'caution'] };
		expect(saved.body.preferences).toEqual(expected);
		expect((await users.findById(app.ctx.db, fleet.id))?.units).toBe('us');
		const res = await prefsApi.GET(event('GET', fleet) as never);
		expect((await res.json()).preferences).toEqual(expected);

		// fields left out keep their value; null clears
		const partial = await put(fleet, { digest_hour: null, quiet_hours: null });
		expect(partial.body.preferences).toEqual({ ...expected, digest_hour: null, quiet_hours: null });
		const audit = await app.ctx.db
			.selectFrom('audit_log')
			.select('details')
			.where('action', '=', 'user.preferences')
			.where('entity_id', '=', fleet.id)
			.orderBy('id', 'desc')
			.executeTakeFirstOrThrow();
		expect(JSON.parse(audit.details!)).toEqual({
			digest_hour: { from: 6, to: null },
			quiet_hours: { from: { from: '22:30', to: '05:45' }, to: null }
		});
	});

	it('answers 422 naming the field at fault, and changes nothing', async () => {
		const fleet = await user('fleet@demo.test');
		const before = await getPreferences(app.ctx.db, fleet.id);
		const cases: [unknown, string][] = [
			[{ digest_hour: 24 }, 'digest_hour'],
			[{ digest_hour: '6' }, 'digest_hour'],
			[{ notify_priorities: ['alarm', 'klaxon'] }, 'notify_priorities.1'],
			[{ notify_priorities: 'alarm' }, 'notify_priorities'],
			[{ quiet_hours: { from: '7:00', to: '06:00' } }, 'quiet_hours.from'],
			[{ quiet_hours: { from: '06:00', to: '06:00' } }, 'quiet_hours.to'],
			[{ quiet_hours: { from: '22:00' } }, 'quiet_hours.to'],
			[{ time_zone: 'Europe/Atlantis' }, 'time_zone'],
			[{ units: 'imperial' }, 'units']
		];
		for (const [body, field] of cases) {
			const res = await put(fleet, body);
			expect(res.status, JSON.stringify(body)).toBe(422);
			expect(res.body.error.code).toBe('invalid');
			expect(Object.keys(res.body.error.fields), JSON.stringify(body)).toEqual([field]);
			expect(res.body.error.message.startsWith(`${field}: `)).toBe(true);
		}
		expect(await getPreferences(app.ctx.db, fleet.id)).toEqual(before);
		const notJson = await prefsApi.PUT({
			...event('PUT', fleet),
			request: new Request('http://localhost:3000/x', { method: 'PUT', body: 'x' })
		} as never);
		expect(notJson.status).toBe(415);
	});

	it('keeps alarm priority on for on-board engineers', async () => {
		const chief = await user('chief@demo.test');
		const res = await put(chief, { notify_priorities: ['warning'] });
		expect(res.status).toBe(422);
		expect(res.body.error.fields).toEqual({
			notify_priorities: 'alarm priority always reaches on-board engineers'
		});
		expect((await put(chief, { notify_priorities: ['alarm'] })).status).toBe(200);
		// a fleet manager ashore may choose not to get them as they happen
		expect(
			(await put(await user('fleet@demo.test'), { notify_priorities: [] })).body.preferences
				.notify_priorities
		).toEqual([]);
	});
});

describe('settings page', () => {
	function form(u: users.AppUser, fields: [string, string][]) {
		const body = new URLSearchParams(fields);
		const request = new Request('http://localhost:3000/settings/notifications', {
			method: 'POST',
			body
		});
		return { request, locals: { user: u, session: null } } as never;
	}

	it('saves from the form, ticking alarm for an on-board engineer whose box is disabled', async () => {
		const tech = await user('tech@demo.test');
		const result = await settingsPage.actions.default(
			form(tech, [
				['notify', 'warning'],
				['digest_hour', '7'],
				['quiet', 'on'],
				['quiet_from', '23:00'],
				['quiet_to', '06:30'],
				['time_zone', 'Europe/Oslo'],
				['units', 'us']
			])
		);
		expect(result).toEqual({ saved: true });
		expect(await getPreferences(app.ctx.db, tech.id)).toEqual({
			units: 'us',
			notify_priorities: ['alarm', 'warning'],
			digest_hour: 7,
			quiet_hours: { from: '23:00', to: '06:30' },
			time_zone: 'Europe/Oslo'
		});
	});

	it('returns field errors to the form', async () => {
		const tech = await user('tech@demo.test');
		const result = (await settingsPage.actions.default(
			form(tech, [
				['digest_hour', ''],
				['quiet', 'on'],
				['quiet_from', '23:00'],
				['quiet_to', '23:00'],
				['time_zone', 'Nowhere/Special'],
				['units', 'metric']
			])
		)) as unknown as { status: number; data: { errors: Record<string, string> } };
		expect(result.status).toBe(400);
		expect(Object.keys(result.data.errors).sort()).toEqual(['quiet_hours.to', 'time_zone']);
	});
});

describe('admin mail API and page', () => {
	it('is for administrators only', async () => {
		const chief = await user('chief@demo.test');
		const admin = await user('admin@demo.test');
		expect(
			(await sinkApi.GET(event('GET', chief, undefined, '/api/admin/mail/sink') as never)).status
		).toBe(403);
		expect(
			(await outboxApi.GET(event('GET', chief, undefined, '/api/admin/mail/outbox') as never))
				.status
		).toBe(403);
		await expect(
			adminMailPage.load({ locals: { user: chief, session: null } } as never)
		).rejects.toMatchObject({ status: 403 });

		const sink = await sinkApi.GET(
			event('GET', admin, undefined, '/api/admin/mail/sink?limit=5') as never
		);
		expect(sink.status).toBe(200);
		expect(await sink.json()).toMatchObject({ via: 'sink', sink_running: true, messages: [] });
		const bad = await outboxApi.GET(
			event('GET', admin, undefined, '/api/admin/mail/outbox?status=lost') as never
		);
		expect(bad.status).toBe(400);
		const outbox = await outboxApi.GET(
			event('GET', admin, undefined, '/api/admin/mail/outbox?status=failed') as never
		);
		expect(await outbox.json()).toMatchObject({ counts: { failed: 0 }, messages: [] });
		const page = await adminMailPage.load({ locals: { user: admin, session: null } } as never);
		expect(page).toMatchObject({ transport: { via: 'sink' }, outbox: { failed: [] } });
	});
});
