/**
 * Debian's Chromium driven by playwright-core (never a downloaded browser),
 * with the flags that keep it off the closed network of CI machines.
 */
import { mkdirSync } from 'node:fs';
import { resolve } from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
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
			await page.goto(`${baseUrl}/login`);
			await page.getByLabel('E-mail').fill(email);
			await page.getByLabel('Password').fill(DEMO_PASSWORD);
			await page.getByRole('button', { name: 'Sign in' }).click();
			// the URL is the answer to the sign-in; the fleet page's own loading is each test's business
			try {
				await page.waitForURL(`${baseUrl}/`, { waitUntil: 'commit', timeout: 45_000 });
			} catch (err) {
				const alerts = await page
					.getByRole('alert')
					.allTextContents()
					.catch(() => []);
				throw new Error(
					`sign-in of ${email} did not reach the fleet page: still at ${page.url()}; alerts: ${alerts.join(' | ') || 'none'}; page errors: ${errors.join(' | ') || 'none'}`,
					{ cause: err }
				);
			}
			await page.waitForLoadState('domcontentloaded');
			return { context, page, errors };
		},
		async close() {
			await browser.close();
		}
	};
}
