/**
 * The records page in Chromium against the built app: the demo's wear-down
 * trend and commissioning records show; a technician adds a wear reading, a
 * seal test (judged as typed, then stored) and a photo; the shore office reads
 * the same page with no forms to change it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from '../helpers/server';
import { launchBrowser, ARTIFACTS, type TestBrowser } from './browser';

let server: TestServer;
let browser: TestBrowser;
const CORRIN_BAY = 1; // the demo vessels are seeded in order

beforeAll(async () => {
	server = await startServer({ SIMULATOR: 'off' });
	browser = await launchBrowser();
});
afterAll(async () => {
	await browser?.close();
	await server?.stop();
});

describe('records', () => {
	it('a technician reads the demo records and adds a wear reading, a seal test and a photo', async () => {
		const { context, page, errors } = await browser.signedIn(server.url, 'tech@demo.test');
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}`);
		await page.getByRole('link', { name: 'Records' }).click();
		await page.waitForURL(/\/records/);
		// the demo's yearly readings: a chart, a rate and a projected date
		await expect.poll(() => page.getByTestId('wear-chart').count()).toBe(1);
		expect(await page.getByTestId('wear-projection').textContent()).toMatch(/\d{4}-\d\d-\d\d/);
		expect(await page.getByTestId('records-caution').textContent()).toMatch(/liquid\s+nitrogen/);
		expect(await page.getByTestId('seal-test-caution').textContent()).toMatch(/release the\s+pressure before opening/);
		const wearRows = page.getByTestId('wear-panel').locator('tbody tr');
		const before = await wearRows.count();
		expect(before).toBeGreaterThan(2);

		const wear = page.getByTestId('form-wear');
		await wear.getByLabel('Measured on').fill('2026-11-20');
		await wear.getByLabel(/Gauge reading/).fill('9.5');
		await wear.getByRole('button', { name: 'Add reading' }).click();
		await expect.poll(() => wearRows.count()).toBe(before + 1);
		expect(await wearRows.first().textContent()).toContain('2026-11-20');

		// a refused form says what is wrong beside the field and stores nothing
		await wear.getByLabel(/Gauge reading/).fill('lots');
		await wear.getByRole('button', { name: 'Add reading' }).click();
		await expect.poll(() => wear.locator('.field-error').count()).toBeGreaterThan(0);
		expect(await wearRows.count()).toBe(before + 1);

		// the new reading was a slip: voided with a reason, it stays listed, struck through
		const newest = wearRows.first();
		await newest.getByText('Void…').click();
		await newest.getByLabel('Why is this record void?').fill('gauge misread; re-measured next day');
		await newest.getByRole('button', { name: 'Void' }).click();
		await expect.poll(() => wearRows.first().getByTestId('voided').count()).toBe(1);
		expect(await wearRows.first().textContent()).toContain('gauge misread');
		expect(await wearRows.count()).toBe(before + 1);

		// the seal test is judged as it is typed, by the same function as the server's
		const seal = page.getByTestId('form-sealTest');
		await seal.getByLabel(/^Readings/).fill('0, 3.00\n60, 3.00\n120, 2.97\n180, 2.95');
		await expect.poll(() => page.getByTestId('seal-preview').textContent()).toMatch(/Would fail/);
		await seal.getByLabel(/^Readings/).fill('0, 3.00\n60, 3.00\n120, 3.00\n180, 3.00');
		await expect.poll(() => page.getByTestId('seal-preview').textContent()).toMatch(/Would pass/);
		const sealRows = page.getByTestId('seal-table').locator('tbody tr');
		const sealsBefore = await sealRows.count();
		await seal.getByRole('button', { name: 'Record test' }).click();
		await expect.poll(() => sealRows.count()).toBe(sealsBefore + 1);
		expect(await sealRows.first().textContent()).toContain('Pass');

		// a photo: a PNG's signature and header, as a camera would not make it but a checker reads it
		const png = Buffer.from([
			0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52
		]);
		const att = page.getByTestId('form-attachment');
		await att
			.locator('input[type=file]')
			.setInputFiles({ name: 'aft-seal.png', mimeType: 'image/png', buffer: png });
		await att.getByLabel('What it shows').fill('aft seal after fitting');
		await att.getByRole('button', { name: 'Attach' }).click();
		await expect
			.poll(() => page.getByTestId('attachments-table').textContent())
			.toContain('aft-seal.png');
		const href = await page.getByRole('link', { name: 'aft-seal.png' }).getAttribute('href');
		const res = await context.request.get(server.url + href);
		expect(res.headers()['content-type']).toBe('image/png');
		expect(Buffer.from(await res.body()).equals(png)).toBe(true);

		await page.screenshot({ path: `${ARTIFACTS}/records-light.png`, fullPage: true });
		expect(errors).toEqual([]);
		await context.close();
	});

	it('the shore office reads the records and has nothing to change them with', async () => {
		const { context, page, errors } = await browser.signedIn(server.url, 'shore@demo.test');
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}/records`);
		await expect.poll(() => page.getByTestId('wear-chart').count()).toBe(1);
		const seals = await page.getByTestId('seal-table').locator('tbody tr').allTextContents();
		expect(seals.length).toBeGreaterThan(0);
		// the demo's commissioning test held 3.01 bar for 3 minutes 30 s: a pass
		for (const row of seals) expect(row).toContain('Pass');
		for (const form of ['wear', 'wearLimit', 'bearing', 'sealTest', 'attachment']) {
			expect([form, await page.getByTestId(`form-${form}`).count()]).toEqual([form, 0]);
		}
		// the shrink-fit calculator still calculates, but offers no save
		await expect
			.poll(() => page.getByTestId('shrink-preview').textContent())
			.toMatch(/Heat the liner/);
		expect(await page.getByRole('button', { name: 'Save plan' }).count()).toBe(0);

		// the printable report carries the installation's records in force
		await page.goto(`${server.url}/vessels/${CORRIN_BAY}/report`);
		const summary = page.getByTestId('report-records');
		await expect.poll(() => summary.locator('tbody tr').count()).toBe(2);
		const port = (await summary.locator('tbody tr').first().textContent()) ?? '';
		expect(port).toMatch(/Port shaft/);
		expect(port).toMatch(/\d{4}-\d\d-\d\d\s*Pass/);
		expect(port).toMatch(/\/ year/);
		expect(errors).toEqual([]);
		await context.close();
	});
});
