/**
 * Live watch in Chromium against the built app, with a test gateway
 * publishing through the real broker: the charts draw and move, a pump trip
 * shows the alarm banner in time, an acknowledgement on one page reaches
 * another user's page, scope holds, and the stream comes back after the
 * server restarts. Screenshots of both themes are kept in test-results/.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { gzipSync } from 'node:zlib';
import type { MqttClient } from 'mqtt';
import { startServer, type TestServer } from '../helpers/server';
import { PREFIX, connectGateway, telemetry } from '../helpers/gateway';
import { ARTIFACTS, launchBrowser, type TestBrowser } from './browser';

let server: TestServer;
let browser: TestBrowser;
let gateway: MqttClient;
let flow = 110; // L/min on corrin-bay's port shaft; its minimum is 63
let publisher: NodeJS.Timeout;
const CORRIN_BAY = 1;

async function startGateway() {
	gateway = await connectGateway(server.mqttPort, 'corrin-bay');
	publisher = setInterval(() => {
		const ts = Date.now();
		for (const [shaft, q] of [['port', flow], ['stbd', 120]] as const) {
			gateway.publish(telemetry('corrin-bay', shaft), JSON.stringify({ ts, flow_lpm: q + Math.random(), supply_bar: 1.2, temp_c: 12, shaft_rpm: 120 }), { qos: 1 });
		}
	}, 1000);
}

beforeAll(async () => {
	server = await startServer();
	browser = await launchBrowser();
	await startGateway();
});
afterAll(async () => {
	clearInterval(publisher);
	gateway?.end(true);
	await browser?.close();
	await server?.stop();
});

describe('live watch', () => {
	it('draws the charts and keeps them moving', async () => {
		const { context, page } = await browser.signedIn(server.url, 'chief@demo.test');
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}`);
		await expect.poll(() => page.getByTestId('stream-status').getAttribute('data-status'), { timeout: 10_000 }).toBe('live');
		const chart = page.getByTestId('shaft-live').first().locator('canvas').first();
		await chart.waitFor();
		const before = await chart.screenshot();
		await page.waitForTimeout(2500);
		const after = await chart.screenshot();
		expect(Buffer.compare(before, after)).not.toBe(0);
		await expect.poll(async () => Number((await page.getByTestId('live-flow').first().textContent())?.match(/[\d.]+/)?.[0])).toBeGreaterThan(100);
		await context.close();
	});

	it('a pump trip shows the banner within the alarm delay plus 2 s, and an acknowledgement reaches another user', async () => {
		const chief = await browser.signedIn(server.url, 'chief@demo.test');
		const fleet = await browser.signedIn(server.url, 'fleet@demo.test');
		await chief.page.goto(`${server.url}/vessels/${CORRIN_BAY}`);
		await fleet.page.goto(`${server.url}/alarms`);
		await expect.poll(() => chief.page.getByTestId('stream-status').getAttribute('data-status'), { timeout: 10_000 }).toBe('live');

		const tripped = Date.now();
		flow = 20; // the duty pump trips
		// at once, before the alarm's on-delay has run: the shaft does not look normal meanwhile
		const pending = chief.page.locator('[data-testid="shaft-live"][data-shaft="port"]').getByTestId('below-minimum');
		await pending.waitFor({ timeout: 5_000 });
		expect(await pending.textContent()).toContain('alarm pending');
		const banner = chief.page.getByTestId('alarm-banner');
		await banner.waitFor({ timeout: 15_000 + 2_000 + 1_500 }); // on-delay + 2 s + one publishing interval
		expect(Date.now() - tripped).toBeLessThan(15_000 + 2_000 + 1_500);
		await expect.poll(() => banner.textContent()).toContain('Low flow');
		await expect.poll(() => chief.page.title()).toMatch(/^\(\d+\) /);

		const row = (p: typeof chief.page) => p.locator('[data-alarm-id][data-type="low_flow"]').first();
		await row(fleet.page).waitFor({ timeout: 5_000 });
		expect(await row(fleet.page).getAttribute('data-state')).toBe('unacknowledged');
		// the fleet manager has the alarm's history open before the acknowledgement: it follows
		await row(fleet.page).getByRole('button', { name: 'History' }).click();
		await row(fleet.page).locator('ol').waitFor({ timeout: 5_000 });
		await row(chief.page).getByPlaceholder('What was done (optional)').fill('Standby pump started by hand');
		await row(chief.page).getByRole('button', { name: 'Acknowledge' }).click();
		await expect.poll(() => row(fleet.page).getAttribute('data-state'), { timeout: 5_000 }).toBe('acknowledged');
		await expect.poll(() => row(fleet.page).getByTestId('alarm-state').textContent()).toBe('Acknowledged');
		// what was done is kept with the acknowledgement, for everyone who reads the alarm's history
		await expect.poll(() => row(fleet.page).locator('ol').textContent(), { timeout: 5_000 }).toContain('“Standby pump started by hand”');

		// once the alarm sounds the badge gives way to it; the alarm card's buttons stay inside the page
		await expect.poll(() => pending.count(), { timeout: 5_000 }).toBe(0);
		for (const width of [1920, 820]) {
			await chief.page.setViewportSize({ width, height: 1080 });
			await chief.page.waitForTimeout(300); // the charts follow the window's width
			expect(await chief.page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth), `${width} px`).toBeLessThanOrEqual(0);
		}
		await chief.page.setViewportSize({ width: 1440, height: 900 });
		await chief.page.screenshot({ path: `${ARTIFACTS}/vessel-light.png`, fullPage: true });
		flow = 110; // the standby pump has started
		await chief.context.close();
		await fleet.context.close();
	});

	it('loads less than 150 kB of JavaScript (gzipped) for the vessel page', async () => {
		const { context, page } = await browser.signedIn(server.url, 'chief@demo.test');
		const scripts = new Map<string, number>();
		page.on('response', async (res) => {
			if (res.request().resourceType() === 'script' || res.url().endsWith('.js')) {
				const body = await res.body().catch(() => null);
				if (body) scripts.set(res.url(), gzipSync(body).length);
			}
		});
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}`, { waitUntil: 'networkidle' });
		// a fresh navigation, so every chunk the page needs is fetched, not taken from the client router
		await page.reload({ waitUntil: 'networkidle' });
		const total = [...scripts.values()].reduce((a, b) => a + b, 0);
		expect(scripts.size).toBeGreaterThan(0);
		expect(total).toBeLessThan(150 * 1024);
		await context.close();
	});

	it('the separator page follows the purge valve and reloads its data when a purge starts, without waiting for its 15 s refresh', async () => {
		const { context, page } = await browser.signedIn(server.url, 'tech@demo.test');
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}/separator`);
		await expect.poll(() => page.getByTestId('stream-status').getAttribute('data-status'), { timeout: 10_000 }).toBe('live');
		const now = page.getByLabel('Separator now');
		const state = (dp_bar: number, purge_valve: 'open' | 'closed') =>
			gateway.publish(`${PREFIX}/corrin-bay/separator/state`, JSON.stringify({ ts: Date.now(), dp_bar, purge_valve }), { qos: 1 });

		// each wait is far shorter than the page's own 15 s refresh: only the stream can meet it
		const reloaded = page.waitForRequest((r) => r.url().includes('/separator/__data.json'), { timeout: 4_000 });
		state(0.42, 'open');
		await expect.poll(() => now.textContent(), { timeout: 4_000 }).toContain('Open');
		await reloaded;
		expect(await now.textContent()).toContain('0.42 bar');
		state(0.18, 'closed');
		await expect.poll(() => now.textContent(), { timeout: 4_000 }).toContain('Closed');
		await context.close();
	});

	it('following a link from one vessel to another (as the alarm banner does) shows the other vessel live, not the first', async () => {
		const { context, page } = await browser.signedIn(server.url, 'fleet@demo.test');
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}`);
		await expect.poll(() => page.getByTestId('stream-status').getAttribute('data-status'), { timeout: 10_000 }).toBe('live');
		const other = 2;
		const opened = page.waitForRequest((r) => r.url().includes(`/api/vessels/${other}/live`), { timeout: 5_000 });
		// a client-side navigation between two vessels' pages, through the router like any link in the app
		await page.evaluate((href) => {
			const a = Object.assign(document.createElement('a'), { href, textContent: 'next vessel' });
			document.body.append(a);
			a.click();
		}, `/vessels/${other}`);
		await opened;
		await expect.poll(() => page.url()).toMatch(new RegExp(`/vessels/${other}$`));
		await context.close();
	});

	it('a technician of another vessel cannot open the page or the stream', async () => {
		const skerry = 4;
		const tech = await browser.signedIn(server.url, 'tech@demo.test'); // corrin-bay and hallow-tern only
		expect((await tech.page.goto(`${server.url}/vessels/${skerry}`))?.status()).toBe(404);
		const stream = await tech.page.evaluate(async (url) => (await fetch(url)).status, `${server.url}/api/vessels/${skerry}/live`);
		expect(stream).toBe(404);
		await tech.context.close();
	});

	it('the stream resumes after the server restarts', async () => {
		const { context, page } = await browser.signedIn(server.url, 'chief@demo.test');
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}`);
		const status = page.getByTestId('stream-status');
		await expect.poll(() => status.getAttribute('data-status'), { timeout: 10_000 }).toBe('live');
		clearInterval(publisher);
		gateway.end(true);
		await server.restart();
		await expect.poll(() => status.getAttribute('data-status'), { timeout: 10_000 }).not.toBe('live');
		// while it is down the figures fade, so they are not read as current
		const figures = page.getByTestId('live-figures');
		expect(await figures.evaluate((e) => Number(getComputedStyle(e).opacity))).toBeLessThan(1);
		await startGateway();
		// the session survives the restart (it is in the database); EventSource reconnects itself
		await expect.poll(() => status.getAttribute('data-status'), { timeout: 30_000 }).toBe('live');
		expect(await figures.evaluate((e) => Number(getComputedStyle(e).opacity))).toBe(1);
		const seen = await page.getByTestId('live-flow').first().textContent();
		await expect.poll(async () => (await page.getByTestId('live-flow').first().textContent()) !== seen, { timeout: 10_000 }).toBe(true);
		await context.close();
	});

	it('saves screenshots of the fleet and vessel pages in both themes', async () => {
		for (const dark of [false, true]) {
			const { context, page } = await browser.signedIn(server.url, 'chief@demo.test', { dark });
			const theme = dark ? 'dark' : 'light';
			expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe(theme);
			await page.waitForTimeout(1500);
			await page.screenshot({ path: `${ARTIFACTS}/fleet-${theme}.png`, fullPage: true });
			await page.goto(`${server.url}/vessels/${CORRIN_BAY}`);
			await page.waitForTimeout(2500);
			await page.screenshot({ path: `${ARTIFACTS}/vessel-${theme}.png`, fullPage: true });
			await context.close();
		}
	});
});
