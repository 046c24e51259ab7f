/**
 * Debian's Chromium driven by playwright-core (never a downloaded browser),
 * with the flags that keep it off the closed network of CI machines.
 */
import { mkdirSync } from 'node:fs';
import { resolve } from 'node:path';
import {
	chromium,
	type Browser,
	type BrowserContext,
	type Page,
	type Request
} from 'playwright-core';
import { DEMO_PASSWORD } from '../helpers/http';

export const ARTIFACTS = resolve(import.meta.dirname, '../../test-results');

export interface TestBrowser {
	browser: Browser;
	/** a fresh context (its own cookies) signed in as `email` */
	signedIn(
		baseUrl: string,
		email: string,
		options?: { dark?: boolean }
	): Promise<{ context: BrowserContext; page: Page; errors: string[] }>;
	close(): Promise<void>;
}

export async function launchBrowser(): Promise<TestBrowser> {
	const browser = await chromium.launch({
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		args: [
			'--headless',
			'--no-sandbox',
			'--disable-gpu',
			'--disable-quic',
			'--no-first-run',
			'--disable-background-networking',
			'--disable-component-update',
			'--disable-sync'
		]
		// playwright gives every launch a fresh, empty profile directory of its own
	});
	mkdirSync(ARTIFACTS, { recursive: true });
	return {
		browser,
		async signedIn(baseUrl, email, options = {}) {
			const context = await browser.newContext({
				viewport: { width: 1440, height: 900 },
				colorScheme: options.dark ? 'dark' : 'light'
			});
			const page = await context.newPage();
			const errors: string[] = [];
			page.on('pageerror', (e) => errors.push(e.message));
			page.on('console', (m) => {
				if (m.type() === 'error') errors.push(m.text());
			});
			// what the page is still waiting for, should the sign-in stall
			const pending = new Map<Request, string>();
			const failed: string[] = []; // aborted by a navigation, most of them: only for the diagnosis
			page.on('request', (r) => pending.set(r, `${r.method()} ${new URL(r.url()).pathname}`));
			page.on('requestfinished', (r) => pending.delete(r));
			page.on('requestfailed', (r) => {
				failed.push(`${pending.get(r)} (${r.failure()?.errorText})`);
				pending.delete(r);
			});
			for (let attempt = 1; ; attempt++) {
				await page.goto(`${baseUrl}/login`);
				await page.getByLabel('E-mail').fill(email);
				await page.getByLabel('Password').fill(DEMO_PASSWORD);
				await page.getByRole('button', { name: 'Sign in' }).click();
				// the URL is the answer to the sign-in; the fleet page's own loading is each test's business
				try {
					await page.waitForURL(`${baseUrl}/`, { waitUntil: 'commit', timeout: 25_000 });
					break;
				} catch (err) {
					const why = await stall(page, baseUrl, errors, [...pending.values()], failed);
					// a stalled sign-in is retried once, loudly: the log keeps what it was waiting for
					if (attempt === 1) {
						console.warn(`[e2e] sign-in of ${email} stalled, trying once more: ${why}`);
						continue;
					}
					throw new Error(`sign-in of ${email} did not reach the fleet page: ${why}`, {
						cause: err
					});
				}
			}
			await page.waitForLoadState('domcontentloaded');
			return { context, page, errors };
		},
		async close() {
			await browser.close();
		}
	};
}

/** Where a sign-in stuck: the page's refusals, its unanswered requests, and whether the server answers at all. */
async function stall(
	page: Page,
	baseUrl: string,
	errors: string[],
	pending: string[],
	failed: string[]
): Promise<string> {
	const texts = (selector: string) =>
		page
			.locator(selector)
			.allTextContents()
			.catch(() => [] as string[]);
	const [alerts, fields] = [await texts('[role=alert]'), await texts('.field-error')];
	const started = Date.now();
	const health = await fetch(`${baseUrl}/api/health`, { signal: AbortSignal.timeout(10_000) })
		.then((r) => `${r.status} in ${Date.now() - started} ms`)
		.catch((e: Error) => `no answer in ${Date.now() - started} ms (${e.message})`);
	return (
		`still at ${page.url()}; alerts: ${alerts.join(' | ') || 'none'}; ` +
		`field errors: ${fields.join(' | ') || 'none'}; unanswered requests: ${pending.join(', ') || 'none'}; ` +
		`failed requests: ${failed.join(', ') || 'none'}; ` +
		`page errors: ${errors.join(' | ') || 'none'}; /api/health: ${health}`
	);
}
