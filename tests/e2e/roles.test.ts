/**
 * Each demo role signs in through the real sign-in page of the built app and
 * sees what that role may see — and nothing else.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from '../helpers/server';
import { launchBrowser, type TestBrowser } from './browser';

let server: TestServer;
let browser: TestBrowser;

beforeAll(async () => {
	server = await startServer();
	browser = await launchBrowser();
});
afterAll(async () => {
	await browser?.close();
	await server?.stop();
});

const ALL = ['corrin-bay', 'hallow-tern', 'lakeline-wren', 'skerry-lark'];

describe.each([
	['admin@demo.test', 'Administrator', ALL, true],
	['fleet@demo.test', 'Fleet manager', ALL, false],
	['chief@demo.test', 'Chief engineer', ['corrin-bay', 'skerry-lark'], false],
	['tech@demo.test', 'Technician', ['corrin-bay', 'hallow-tern'], false],
	['shore@demo.test', 'Shore office', ALL, false]
])('%s', (email, roleLabel, vessels, isAdmin) => {
	it(`sees ${vessels.length} vessels, ${isAdmin ? 'with' : 'without'} administration`, async () => {
		const { context, page, errors } = await browser.signedIn(server.url, email);
		await expect.poll(() => page.getByTestId('whoami').textContent()).toContain(roleLabel);
		const shown = await page.getByTestId('vessel-card').evaluateAll((cards) => cards.map((c) => c.getAttribute('data-vessel')));
		expect(shown.sort()).toEqual([...vessels].sort());
		expect(await page.getByRole('link', { name: 'Administration' }).count()).toBe(isAdmin ? 1 : 0);

		// the server refuses what the page does not offer: another vessel's page is 404, admin 403
		const hidden = ALL.filter((v) => !vessels.includes(v));
		for (const code of hidden) {
			const id = ALL.indexOf(code) + 1; // demo vessels are seeded in this order
			const res = await page.goto(`${server.url}/vessels/${id}`);
			expect(res?.status()).toBe(404);
		}
		const admin = await page.goto(`${server.url}/admin/fleet`);
		expect(admin?.status()).toBe(isAdmin ? 200 : 403);
		expect(errors.filter((e) => !/status of 40[34]/.test(e))).toEqual([]);
		await context.close();
	});
});
