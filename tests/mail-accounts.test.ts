/**
 * Accounts by e-mail, end to end through the real sink: an invitation queued
 * with the user it invites, reset links that work once and expire, the same
 * answer for unknown addresses (and no mail to them), and the throttles.
 * Route modules are called directly with a request event, so no build is needed.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appUser, startTestApp, type TestApp } from './helpers/app';
import { routeEvent } from './helpers/route';
import { waitFor } from './helpers/ports';
import { actorOf } from '$lib/server/audit';
import { checkCredentials } from '$lib/server/auth/sign-in';
import * as users from '$lib/server/users/repository';
import { createUser, updateUser } from '$lib/server/users/service';
import {
	requestPasswordReset,
	sendAccountLink,
	usePasswordToken,
	viewAccountToken
} from '$lib/server/account/service';
import { hashAccountToken } from '$lib/server/account/tokens';
import { userCreate } from '$lib/schemas/users';
import * as resetApi from '../src/routes/api/account/password-reset/+server';
import * as resetConfirmApi from '../src/routes/api/account/password-reset/confirm/+server';
import * as acceptApi from '../src/routes/api/account/invitation/accept/+server';
import * as adminResetApi from '../src/routes/api/users/[userId]/password-reset/+server';
import * as forgotPage from '../src/routes/account/forgot/+page.server';
import * as resetPage from '../src/routes/account/reset/[token]/+page.server';

let app: TestApp;

beforeAll(async () => {
	app = await startTestApp();
});
afterAll(async () => {
	await app?.stop();
});

const NEW_PASSWORD = 'brass-sextant-tide-42';

const user = (email: string) => appUser(app.ctx, email);

/** Every message the sink received for an address, oldest first. */
async function sinkMail(address: string) {
	await app.ctx.services.mail!.deliverDue();
	const rows = await app.ctx.db.selectFrom('mail_sink').selectAll().orderBy('id').execute();
	return rows.filter((r) =>
		(JSON.parse(r.envelope_to) as string[]).some((a) => a.toLowerCase() === address.toLowerCase())
	);
}

async function outboxTo(address: string) {
	return app.ctx.db
		.selectFrom('mail_outbox')
		.selectAll()
		.where('to_address', '=', address)
		.orderBy('id')
		.execute();
}

/** The link in the newest message to the address, from its plain text; the HTML must carry the same. */
async function latestLink(address: string, kind: 'invite' | 'reset') {
	const mail = await waitFor(async () => (await sinkMail(address)).at(-1), {
		what: `mail to ${address}`
	});
	const pattern = new RegExp(`http://localhost:3000/account/${kind}/([A-Za-z0-9_-]+)`);
	const match = mail.text?.match(pattern);
	expect(match, `a ${kind} link in: ${mail.text}`).toBeTruthy();
	expect(mail.html).toContain(`href="${match![0]}"`);
	return { url: match![0], token: match![1], mail };
}

function event(
	body: unknown,
	options: {
		user?: users.AppUser | null;
		client?: string;
		params?: Record<string, string>;
		form?: boolean;
	} = {}
) {
	return routeEvent({
		method: 'POST',
		...(options.form
			? { path: '/form', body: new URLSearchParams(body as Record<string, string>) }
			: { path: '/api', json: body }),
		params: options.params,
		user: options.user,
		clientAddress: options.client
	});
}

describe('invitations', () => {
	it('queues the invitation in the same transaction as the new user, and its link works once', async () => {
		const admin = await user('admin@demo.test');
		const vessel = await app.ctx.db
			.selectFrom('vessels')
			.select('id')
			.orderBy('id')
			.executeTakeFirstOrThrow();
		const created = await createUser(
			app.ctx,
			actorOf(admin),
			userCreate.parse({
				email: 'Rhea.Lindqvist@example.org',
				name: 'Rhea Lindqvist',
				role: 'technician',
				vessel_ids: [vessel.id]
			})
		);
		// Queued by the time createUser returns: part of its transaction, not an afterthought.
		const [queued, ...more] = await outboxTo('rhea.lindqvist@example.org');
		expect(more).toHaveLength(0);
		expect(queued.kind).toBe('invitation');
		expect(queued.to_user_id).toBe(created.id);
		const audit = await app.ctx.db
			.selectFrom('audit_log')
			.select('details')
			.where('action', '=', 'user.create')
			.where('entity_id', '=', created.id)
			.executeTakeFirstOrThrow();
		expect(JSON.parse(audit.details!).invitation_mail_id).toBe(queued.id);

		const { token, mail } = await latestLink('rhea.lindqvist@example.org', 'invite');
		expect(mail.subject).toBe('Your Aftwater account: set your password');
		expect(mail.text).toContain(`${admin.name} has given you an Aftwater account (Technician)`);
		expect(mail.text).toContain('Aftwater supplements, and never replaces');
		const stored = await app.ctx.db
			.selectFrom('account_tokens')
			.selectAll()
			.where('user_id', '=', created.id)
			.executeTakeFirstOrThrow();
		expect(stored.token_hash).toBe(hashAccountToken(token));
		expect(stored.token_hash).not.toContain(token);
		expect(stored.expires_at - stored.created_at).toBe(7 * 24 * 3_600_000);

		expect(await viewAccountToken(app.ctx, 'invite', token)).toMatchObject({
			state: 'valid',
			email: 'rhea.lindqvist@example.org'
		});
		expect(await viewAccountToken(app.ctx, 'reset', token)).toEqual({ state: 'unknown' }); // an invite is not a reset

		const res = await acceptApi.POST(event({ token, password: NEW_PASSWORD }) as never);
		expect(res.status).toBe(200);
		expect(
			await checkCredentials(app.ctx, 'rhea.lindqvist@example.org', NEW_PASSWORD, '192.0.2.50')
		).toMatchObject({ ok: true });

		const again = await acceptApi.POST(
			event({ token, password: 'another-long-password' }) as never
		);
		expect(again.status).toBe(422);
		expect((await again.json()).error.code).toBe('token_used');
		expect(
			await checkCredentials(app.ctx, 'rhea.lindqvist@example.org', NEW_PASSWORD, '192.0.2.50')
		).toMatchObject({ ok: true });
	});

	it('refuses an expired invitation and a superseded one; a resent one works', async () => {
		const admin = await user('admin@demo.test');
		const created = await createUser(
			app.ctx,
			actorOf(admin),
			userCreate.parse({
				email: 'odile.marsh@example.org',
				name: 'Odile Marsh',
				role: 'fleet_manager'
			})
		);
		const first = await latestLink('odile.marsh@example.org', 'invite');

		const resent = await sendAccountLink(app.ctx, actorOf(admin), created.id);
		expect(resent.kind).toBe('invitation');
		const second = await waitFor(async () => {
			const link = await latestLink('odile.marsh@example.org', 'invite');
			return link.token !== first.token ? link : null;
		});
		expect(await usePasswordToken(app.ctx, 'invite', first.token, NEW_PASSWORD)).toEqual({
			ok: false,
			state: 'expired'
		});

		// Seven days later (the clock moved by editing the stored expiry):
		await app.ctx.db
			.updateTable('account_tokens')
			.set({ expires_at: Date.now() - 1 })
			.where('token_hash', '=', hashAccountToken(second.token))
			.execute();
		const res = await acceptApi.POST(
			event({ token: second.token, password: NEW_PASSWORD }) as never
		);
		expect(res.status).toBe(422);
		expect((await res.json()).error.code).toBe('token_expired');
		expect((await users.findById(app.ctx.db, created.id))?.password_hash).toBeNull();

		await sendAccountLink(app.ctx, actorOf(admin), created.id);
		const third = await waitFor(async () => {
			const link = await latestLink('odile.marsh@example.org', 'invite');
			return link.token !== second.token ? link : null;
		});
		expect(await usePasswordToken(app.ctx, 'invite', third.token, NEW_PASSWORD)).toMatchObject({
			ok: true
		});
	});

	it('answers a garbled token plainly', async () => {
		const res = await acceptApi.POST(
			event({ token: 'not-a-token', password: NEW_PASSWORD }) as never
		);
		expect(res.status).toBe(422);
		expect((await res.json()).error).toMatchObject({
			code: 'token_invalid',
			fields: { token: 'unknown' }
		});
		const short = await acceptApi.POST(
			event({ token: 'x'.repeat(43), password: 'short' }) as never
		);
		expect(short.status).toBe(422);
		expect((await short.json()).error.fields.password).toMatch(/12 characters/);
	});
});

describe('password reset', () => {
	it('sends a link that works once, signs the user out everywhere, and expires after an hour', async () => {
		const chief = await user('chief@demo.test');
		const session = await app.ctx.lucia.createSession(chief.id, {});

		expect(await requestPasswordReset(app.ctx, ' CHIEF@demo.test ', '198.51.100.7')).toEqual({
			ok: true
		});
		const { token, url, mail } = await latestLink('chief@demo.test', 'reset');
		expect(mail.subject).toBe('Reset your Aftwater password');
		const stored = await app.ctx.db
			.selectFrom('account_tokens')
			.selectAll()
			.where('token_hash', '=', hashAccountToken(token))
			.executeTakeFirstOrThrow();
		expect(stored.expires_at - stored.created_at).toBe(3_600_000);

		// the page behind the link shows the form
		const page = await resetPage.load({ params: { token } } as never);
		expect(page).toMatchObject({ valid: true, email: 'chief@demo.test', problem: null });
		expect(url.startsWith('http://localhost:3000/')).toBe(true);

		const res = await resetConfirmApi.POST(event({ token, password: NEW_PASSWORD }) as never);
		expect(res.status).toBe(200);
		expect((await app.ctx.lucia.validateSession(session.id)).session).toBeNull();
		expect(
			await checkCredentials(app.ctx, 'chief@demo.test', 'aftwater-demo', '192.0.2.60')
		).toMatchObject({ ok: false });
		expect(
			await checkCredentials(app.ctx, 'chief@demo.test', NEW_PASSWORD, '192.0.2.60')
		).toMatchObject({ ok: true });

		const again = await resetConfirmApi.POST(
			event({ token, password: 'yet-another-password' }) as never
		);
		expect((await again.json()).error.code).toBe('token_used');
		const usedPage = await resetPage.load({ params: { token } } as never);
		expect(usedPage).toMatchObject({
			valid: false,
			problem: expect.stringContaining('already been used')
		});

		// a fresh link, an hour and a bit later
		await requestPasswordReset(app.ctx, 'chief@demo.test', '198.51.100.7');
		const late = await waitFor(async () => {
			const link = await latestLink('chief@demo.test', 'reset');
			return link.token !== token ? link : null;
		});
		await app.ctx.db
			.updateTable('account_tokens')
			.set({ expires_at: Date.now() - 1 })
			.where('token_hash', '=', hashAccountToken(late.token))
			.execute();
		expect(await usePasswordToken(app.ctx, 'reset', late.token, 'too-late-password')).toEqual({
			ok: false,
			state: 'expired'
		});
		expect(
			await checkCredentials(app.ctx, 'chief@demo.test', NEW_PASSWORD, '192.0.2.60')
		).toMatchObject({ ok: true });
	});

	it('answers the same for an unknown or disabled address and sends it nothing', async () => {
		const admin = await user('admin@demo.test');
		const shore = await user('shore@demo.test');
		await updateUser(app.ctx, actorOf(admin), shore.id, { disabled: true });

		const known = await resetApi.POST(
			event({ email: 'fleet@demo.test' }, { client: '203.0.113.1' }) as never
		);
		const unknown = await resetApi.POST(
			event({ email: 'nobody@example.org' }, { client: '203.0.113.1' }) as never
		);
		const disabled = await resetApi.POST(
			event({ email: 'shore@demo.test' }, { client: '203.0.113.1' }) as never
		);
		expect([known.status, unknown.status, disabled.status]).toEqual([202, 202, 202]);
		const bodies = await Promise.all([known.json(), unknown.json(), disabled.json()]);
		expect(bodies[1]).toEqual(bodies[0]);
		expect(bodies[2]).toEqual(bodies[0]);

		// the form page too
		const a = await forgotPage.actions.default(
			event({ email: 'fleet@demo.test' }, { form: true, client: '203.0.113.2' }) as never
		);
		const b = await forgotPage.actions.default(
			event({ email: 'nobody@example.org' }, { form: true, client: '203.0.113.2' }) as never
		);
		expect(b).toEqual({ ...(a as object), email: 'nobody@example.org' });

		await latestLink('fleet@demo.test', 'reset');
		expect(await outboxTo('nobody@example.org')).toHaveLength(0);
		expect(await outboxTo('shore@demo.test')).toHaveLength(0);
		expect(await sinkMail('nobody@example.org')).toHaveLength(0);
		expect(await sinkMail('shore@demo.test')).toHaveLength(0);

		const bad = await resetApi.POST(event({ email: 'not an address' }) as never);
		expect(bad.status).toBe(422);
		expect((await bad.json()).error.fields.email).toBeTruthy();
	});

	it('sends at most three links an hour to one address, silently', async () => {
		for (let i = 0; i < 5; i++) {
			expect(await requestPasswordReset(app.ctx, 'tech@demo.test', `198.18.0.${i}`)).toEqual({
				ok: true
			});
		}
		const queued = await outboxTo('tech@demo.test');
		expect(queued.filter((m) => m.kind === 'password_reset')).toHaveLength(3);
	});

	it('answers 429 to a client that asks too often, whatever the address', async () => {
		const client = '198.19.7.7';
		for (let i = 0; i < 10; i++) {
			const res = await resetApi.POST(
				event({ email: `sailor${i}@example.org` }, { client }) as never
			);
			expect(res.status).toBe(202);
		}
		const res = await resetApi.POST(event({ email: 'fleet@demo.test' }, { client }) as never);
		expect(res.status).toBe(429);
		expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
		expect((await res.json()).error.code).toBe('throttled');
		const other = await resetApi.POST(
			event({ email: 'sailor0@example.org' }, { client: '198.19.7.8' }) as never
		);
		expect(other.status).toBe(202);
	});

	it('lets an administrator send a reset link, and no one else', async () => {
		const admin = await user('admin@demo.test');
		const tech = await user('tech@demo.test');
		const fleet = await user('fleet@demo.test');
		const before = (await outboxTo('fleet@demo.test')).length;

		const denied = await adminResetApi.POST(
			event({}, { user: tech, params: { userId: fleet.id } }) as never
		);
		expect(denied.status).toBe(403);
		const missing = await adminResetApi.POST(
			event({}, { user: admin, params: { userId: 'no-such-user' } }) as never
		);
		expect(missing.status).toBe(404);

		const res = await adminResetApi.POST(
			event({}, { user: admin, params: { userId: fleet.id } }) as never
		);
		expect(res.status).toBe(202);
		expect(await res.json()).toMatchObject({ ok: true, kind: 'password_reset' });
		const after = await outboxTo('fleet@demo.test');
		expect(after).toHaveLength(before + 1);
		const { mail } = await latestLink('fleet@demo.test', 'reset');
		expect(mail.text).toContain(`${admin.name}, an administrator, has sent you a link`); // a name, not an address
	});
});
