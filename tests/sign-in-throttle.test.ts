/**
 * Sign-in throttling against a real database of demo accounts: guessing from
 * one address locks that address out of the account, not the account's owner
 * elsewhere; guessing from many addresses is bounded per account too.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkCredentials } from '$lib/server/auth/sign-in';
import { startTestApp, type TestApp } from './helpers/app';
import { DEMO_PASSWORD } from './helpers/http';

let app: TestApp;
beforeAll(async () => {
	app = await startTestApp();
});
afterAll(() => app?.stop());

const attempt = (email: string, password: string, address: string) => checkCredentials(app.ctx, email, password, address);

describe('sign-in throttle', () => {
	it('five wrong passwords from one address lock that address out of the account, not its owner elsewhere', async () => {
		for (let i = 0; i < 5; i++) expect((await attempt('chief@demo.test', `guess-${i}`, '203.0.113.9')).ok).toBe(false);
		const locked = await attempt('chief@demo.test', DEMO_PASSWORD, '203.0.113.9');
		expect(locked).toMatchObject({ ok: false, reason: 'throttled' });
		// the chief engineer on the ship's network still signs in
		expect((await attempt('chief@demo.test', DEMO_PASSWORD, '10.0.0.12')).ok).toBe(true);
	});

	it('guessing one account from many addresses is stopped at 50 failures in the window', async () => {
		for (let i = 0; i < 50; i++) {
			expect(await attempt('fleet@demo.test', `guess-${i}`, `198.51.100.${i}`)).toMatchObject({ ok: false, reason: 'invalid' });
		}
		expect(await attempt('fleet@demo.test', DEMO_PASSWORD, '198.51.100.200')).toMatchObject({ ok: false, reason: 'throttled' });
	});
});
