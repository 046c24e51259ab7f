/**
 * GET/PUT /api/vessels/{id}/notification-settings and the vessel's
 * notifications page: defaults, who receives what, the roles that may change
 * it, validation that names the field at fault, and the audit of old and new
 * values. Route modules are called directly with an event (as the mail tests
 * do); the vessel scope of the `vesselId` parameter is the hooks' guard.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appUser, shaftIds, startTestApp, type TestApp } from './helpers/app';
import { routeEvent } from './helpers/route';
import * as users from '$lib/server/users/repository';
import { savePreferences } from '$lib/server/mail/preferences';
import { routeInScope } from '$lib/server/auth/guard';
import * as api from '../src/routes/api/vessels/[vesselId=id]/notification-settings/+server';
import * as page from '../src/routes/(app)/vessels/[vesselId=id]/notifications/+page.server';

let app: TestApp;
let corrinId: number;
let skerryId: number;

beforeAll(async () => {
	app = await startTestApp();
	const vessels = await app.ctx.db.selectFrom('vessels').select(['id', 'code']).execute();
	corrinId = vessels.find((v) => v.code === 'corrin-bay')!.id;
	skerryId = vessels.find((v) => v.code === 'skerry-lark')!.id;
});
afterAll(async () => {
	await app?.stop();
});

const user = (email: string) => appUser(app.ctx, email);

const event = (method: string, u: users.AppUser, vesselId: number, body?: unknown) =>
	routeEvent({
		method,
		path: `/api/vessels/${vesselId}/notification-settings`,
		params: { vesselId },
		user: u,
		json: body
	});

async function call(method: 'GET' | 'PUT', email: string, vesselId: number, body?: unknown) {
	const handler = method === 'GET' ? api.GET : api.PUT;
	const res = await handler(event(method, await user(email), vesselId, body) as never);
	return { status: res.status, body: await res.json() };
}

describe('notification settings API', () => {
	it('gives the defaults and who receives what to anyone who sees the vessel', async () => {
		const res = await call('GET', 'tech@demo.test', corrinId);
		expect(res.status).toBe(200);
		expect(res.body).toMatchObject({
			vessel_id: corrinId,
			vessel_name: 'Corrin Bay',
			escalation_after_s: 300,
			incident_holdoff_s: 600,
			defaults: { escalation_after_s: 300, incident_holdoff_s: 600 },
			policy: { hold_s: 5, flood_burst_min: 3, flood_rate_max: 10, flood_rate_window_s: 600 },
			gaps: []
		});
		const byEmail = Object.fromEntries(
			(res.body.recipients as { email: string; gets: unknown }[]).map((r) => [r.email, r.gets])
		);
		// never-saved preferences: alarms and warnings, no digest; shore roles without one are not listed
		expect(byEmail).toEqual({
			'chief@demo.test': { raised: ['alarm', 'warning'], escalation: false, digest: null },
			'tech@demo.test': { raised: ['alarm', 'warning'], escalation: false, digest: null },
			'fleet@demo.test': { raised: [], escalation: true, digest: null }
		});
	});

	it('shows what each person chose, and says so when nobody gets the escalations', async () => {
		const fleet = await user('fleet@demo.test');
		const chief = await user('chief@demo.test');
		await savePreferences(app.ctx, { userId: fleet.id, name: fleet.email }, fleet, {
			notify_priorities: []
		});
		await savePreferences(app.ctx, { userId: chief.id, name: chief.email }, chief, {
			notify_priorities: ['alarm', 'caution'],
			digest_hour: 6,
			time_zone: 'Europe/Lisbon',
			quiet_hours: { from: '22:00', to: '06:00' }
		});
		const shore = await user('shore@demo.test');
		await savePreferences(app.ctx, { userId: shore.id, name: shore.email }, shore, {
			digest_hour: 8
		});
		const res = await call('GET', 'chief@demo.test', corrinId);
		const recipients = res.body.recipients as {
			email: string;
			gets: { raised: string[]; escalation: boolean; digest: number | null };
			digest_time_zone: string | null;
			quiet_hours: unknown;
		}[];
		const chiefRow = recipients.find((r) => r.email === 'chief@demo.test')!;
		expect(chiefRow.gets).toEqual({ raised: ['alarm', 'caution'], escalation: false, digest: 6 });
		expect(chiefRow.digest_time_zone).toBe('Europe/Lisbon'); // two vessels: his own zone
		expect(chiefRow.quiet_hours).toEqual({ from: '22:00', to: '06:00' });
		expect(recipients.find((r) => r.email === 'fleet@demo.test')!.gets.escalation).toBe(false);
		expect(recipients.find((r) => r.email === 'shore@demo.test')!.gets).toEqual({
			raised: [],
			escalation: false,
			digest: 8
		});
		expect(res.body.gaps).toEqual([
			'No fleet manager receives escalations of unacknowledged alarms.'
		]);
		await savePreferences(app.ctx, { userId: fleet.id, name: fleet.email }, fleet, {
			notify_priorities: ['alarm']
		});
	});

	it('lets the chief engineer change it, audited with old and new values', async () => {
		const res = await call('PUT', 'chief@demo.test', corrinId, { escalation_after_s: 120 });
		expect(res.status).toBe(200);
		expect(res.body).toMatchObject({
			escalation_after_s: 120,
			incident_holdoff_s: 600,
			updated_by: 'chief@demo.test'
		});
		expect((await call('GET', 'tech@demo.test', corrinId)).body.escalation_after_s).toBe(120);
		const audit = await app.ctx.db
			.selectFrom('audit_log')
			.selectAll()
			.where('action', '=', 'notification_settings.update')
			.execute();
		expect(audit).toHaveLength(1);
		expect(audit[0]).toMatchObject({
			entity: 'vessel',
			entity_id: String(corrinId),
			vessel_id: corrinId,
			actor: 'chief@demo.test'
		});
		expect(JSON.parse(audit[0].details!)).toEqual({ escalation_after_s: { from: 300, to: 120 } });
		// the same values again change nothing and add no audit entry
		await call('PUT', 'fleet@demo.test', corrinId, { escalation_after_s: 120 });
		expect(
			await app.ctx.db
				.selectFrom('audit_log')
				.select('id')
				.where('action', '=', 'notification_settings.update')
				.execute()
		).toHaveLength(1);
	});

	it('is refused to a technician (403)', async () => {
		const res = await call('PUT', 'tech@demo.test', corrinId, { escalation_after_s: 30 });
		expect(res.status).toBe(403);
		expect((await call('GET', 'tech@demo.test', corrinId)).body.escalation_after_s).toBe(120);
	});

	it('answers 422 naming the field at fault, and changes nothing', async () => {
		const cases: [unknown, string][] = [
			[{ escalation_after_s: 0 }, 'escalation_after_s'],
			[{ escalation_after_s: 90_000 }, 'escalation_after_s'],
			[{ escalation_after_s: 12.5 }, 'escalation_after_s'],
			[{ escalation_after_s: '300' }, 'escalation_after_s'],
			[{ incident_holdoff_s: -1 }, 'incident_holdoff_s'],
			[{ escalation_after_sec: 60 }, 'escalation_after_sec']
		];
		for (const [body, field] of cases) {
			const res = await call('PUT', 'chief@demo.test', corrinId, body);
			expect(res.status, JSON.stringify(body)).toBe(422);
			expect(res.body.error.code).toBe('invalid');
			expect(Object.keys(res.body.error.fields), JSON.stringify(body)).toEqual([field]);
			expect(res.body.error.message.startsWith(`${field}: `)).toBe(true);
		}
		expect((await call('GET', 'chief@demo.test', corrinId)).body.escalation_after_s).toBe(120);
	});

	it('is answered only inside the caller’s vessel scope', async () => {
		// the route's parameter is named vesselId, which hooks resolve and check (404 outside)
		expect(
			await routeInScope(app.ctx.db, await user('tech@demo.test'), { vesselId: String(skerryId) })
		).toBe(false);
		expect(
			await routeInScope(app.ctx.db, await user('chief@demo.test'), { vesselId: String(skerryId) })
		).toBe(true);
		expect(
			await routeInScope(app.ctx.db, await user('fleet@demo.test'), { vesselId: String(skerryId) })
		).toBe(true);
	});

	it('a path naming a vessel and another vessel’s shaft names nothing, even for a user who sees both', async () => {
		const fleet = await user('fleet@demo.test');
		const skerryShaft = (await shaftIds(app.ctx, 'skerry-lark', 'port')).shaftId;
		expect(await routeInScope(app.ctx.db, fleet, { vesselId: String(skerryId), shaftId: String(skerryShaft) })).toBe(true);
		// e.g. a form action posted to /vessels/{corrin}/shafts/{skerry's shaft}
		expect(await routeInScope(app.ctx.db, fleet, { vesselId: String(corrinId), shaftId: String(skerryShaft) })).toBe(false);
	});
});

describe('the vessel’s notifications page', () => {
	function form(u: users.AppUser, vesselId: number, fields: [string, string][]) {
		const request = new Request(`http://localhost:3000/vessels/${vesselId}/notifications`, {
			method: 'POST',
			body: new URLSearchParams(fields)
		});
		return {
			request,
			params: { vesselId: String(vesselId) },
			locals: { user: u, session: null }
		} as never;
	}

	it('loads the overview, and whether the user may change it', async () => {
		const load = (email: string) =>
			user(email).then((u) =>
				page.load({
					locals: { user: u, session: null },
					params: { vesselId: String(skerryId) }
				} as never)
			) as Promise<{
				overview: { vessel_name: string; escalation_after_s: number };
				canEdit: boolean;
			}>;
		const asChief = await load('chief@demo.test');
		expect(asChief.overview).toMatchObject({ vessel_name: 'Skerry Lark', escalation_after_s: 300 });
		expect(asChief.canEdit).toBe(true);
		expect((await load('fleet@demo.test')).canEdit).toBe(true);
		expect((await load('shore@demo.test')).canEdit).toBe(false);
	});

	it('saves from the form, and returns field errors to it', async () => {
		const chief = await user('chief@demo.test');
		const ok = await page.actions.default(
			form(chief, skerryId, [
				['escalation_after_s', '240'],
				['incident_holdoff_s', '900']
			])
		);
		expect(ok).toEqual({ saved: true });
		const bad = (await page.actions.default(
			form(chief, skerryId, [
				['escalation_after_s', 'soon'],
				['incident_holdoff_s', '900']
			])
		)) as unknown as { status: number; data: { errors: Record<string, string> } };
		expect(bad.status).toBe(400);
		expect(Object.keys(bad.data.errors)).toEqual(['escalation_after_s']);
		const res = await call('GET', 'chief@demo.test', skerryId);
		expect(res.body).toMatchObject({ escalation_after_s: 240, incident_holdoff_s: 900 });

		const tech = await user('tech@demo.test');
		await expect(
			page.actions.default(
				form(tech, skerryId, [
					['escalation_after_s', '10'],
					['incident_holdoff_s', '0']
				])
			)
		).rejects.toMatchObject({ status: 403 });
	});
});
