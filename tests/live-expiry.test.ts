/**
 * A live stream ends when the session it was opened with expires, so an
 * expired session stops receiving data even if nothing else happens: the
 * real hub of a whole app in process, on a real SQLite file.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LiveHub } from '$lib/server/live/hub';
import { startTestApp, type TestApp } from './helpers/app';

let app: TestApp;
let hub: LiveHub;

beforeAll(async () => {
	app = await startTestApp();
	hub = app.ctx.services.live!;
});
afterAll(() => app?.stop());

const ended = (client: { closed: boolean; onClose: () => void }) =>
	new Promise<void>((resolve) => {
		if (client.closed) return resolve();
		const before = client.onClose;
		client.onClose = () => {
			before();
			resolve();
		};
	});

describe('stream expiry', () => {
	it('a stream ends when its session expires; one with a later expiry stays open', async () => {
		const expiring = await hub.openFleet({ userId: 'u-expiring', credential: 'session:a', expiresAt: Date.now() + 300 }, 'all');
		const lasting = await hub.openFleet({ userId: 'u-lasting', credential: 'session:b', expiresAt: Date.now() + 3_600_000 }, 'all');
		const token = await hub.openFleet({ userId: 'u-token', credential: 'token:1', expiresAt: null }, 'all');
		const count = hub.clientCount();
		await ended(expiring);
		await new Promise((r) => setTimeout(r, 200));
		expect(expiring.closed).toBe(true);
		expect(lasting.closed).toBe(false);
		expect(token.closed).toBe(false);
		expect(hub.clientCount()).toBe(count - 1);

		hub.closeCredential('token:1');
		expect(token.closed).toBe(true);
		expect(lasting.closed).toBe(false);
		lasting.close();
		expect(hub.clientCount()).toBe(count - 3);
	});

	it('a session already expired when the stream opens ends at once', async () => {
		const late = await hub.openFleet({ userId: 'u-late', credential: 'session:c', expiresAt: Date.now() - 1 }, 'all');
		await ended(late);
		expect(late.closed).toBe(true);
	});
});
