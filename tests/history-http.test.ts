/**
 * History over HTTP against the built app (`vite build` first): vessel scope
 * (checked in hooks: a shaft outside the caller's vessels is 404 before any
 * handler runs), roles (shore office reads and exports, never uploads),
 * multipart uploads through adapter-node's body limit, streamed export, and
 * the pages answering for the right people.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from './helpers/server';
import { postAction, postForm, signIn, type Client } from './helpers/http';

let server: TestServer;
let admin: Client;
let chief: Client; // corrin-bay and skerry-lark
let tech: Client; // corrin-bay and hallow-tern
let shore: Client;
const ids: Record<string, { vessel: number; shaft: number }> = {};

function upload(
	c: Client,
	shaftId: number,
	name: string,
	content: string | Uint8Array<ArrayBuffer>,
	type = 'text/csv'
) {
	const form = new FormData();
	form.set('file', new File([content], name, { type }));
	// a browser sends its page's origin with a form post; SvelteKit refuses cross-origin ones
	return fetch(`${server.url}/api/shafts/${shaftId}/imports`, {
		method: 'POST',
		body: form,
		headers: { cookie: c.cookie!, origin: server.env.ORIGIN }
	});
}

beforeAll(async () => {
	server = await startServer({ ALARM_RULES: '0' });
	[admin, chief, tech, shore] = await Promise.all(
		['admin@demo.test', 'chief@demo.test', 'tech@demo.test', 'shore@demo.test'].map((e) =>
			signIn(server.url, e)
		)
	);
	const { vessels } = await (await admin.get('/api/vessels')).json();
	for (const v of vessels)
		for (const s of v.shafts) ids[`${v.code}/${s.code}`] = { vessel: v.id, shaft: s.id };
});
afterAll(() => server?.stop());

describe('vessel scope', () => {
	it('a shaft of another vessel is 404 for every history route, uploads included', async () => {
		const hallow = ids['hallow-tern/main'].shaft;
		for (const path of ['samples', 'compliance', 'export.csv', 'imports']) {
			const res = await chief.get(`/api/shafts/${hallow}/${path}`);
			expect([path, res.status]).toEqual([path, 404]);
		}
		const res = await upload(chief, hallow, 'log.csv', 'time,flow\n2026-01-01T00:00:00Z,70\n');
		expect(res.status).toBe(404);
		expect((await res.json()).error.code).toBe('not_found');
		expect((await chief.get(`/vessels/${ids['hallow-tern/main'].vessel}/history`)).status).toBe(
			404
		);
		expect((await chief.get(`/vessels/${ids['hallow-tern/main'].vessel}/uploads`)).status).toBe(
			404
		);
	});

	it('a shaft page under another vessel than its own is 404, its form actions too; a separator alarm is refused there', async () => {
		const corrin = ids['corrin-bay/port'];
		const skerry = ids['skerry-lark/port']; // the chief sees both vessels
		const form = new URLSearchParams({ type: 'low_flow', out_of_service: 'true', reason: 'flow meter replaced' });
		const wrong = `/vessels/${corrin.vessel}/shafts/${skerry.shaft}`;
		const page = await chief.get(wrong);
		expect(page.status).toBe(404);
		expect(page.headers.get('content-type')).toContain('text/html');
		expect(await page.text()).toContain('<a href="/">Back to the fleet</a>');
		// the shaft's settings, shown to a technician, say who may change them
		const techPage = await (await tech.get(`/vessels/${corrin.vessel}/shafts/${corrin.shaft}`)).text();
		expect(techPage).toContain('data-testid="settings-read-only"');
		expect(await (await chief.get(`/vessels/${corrin.vessel}/shafts/${corrin.shaft}`)).text()).not.toContain('settings-read-only');
		expect((await postForm(chief, server.env.ORIGIN, `${wrong}?/service`, form)).status).toBe(404);
		const sep = await postAction(chief, server.env.ORIGIN, `/vessels/${corrin.vessel}/shafts/${corrin.shaft}?/service`, {
			type: 'purge_missed',
			out_of_service: 'true',
			reason: 'separator under repair'
		});
		expect(sep.failure).toBe(400);
		expect(sep.data!.service.errors.type).toMatch(/separator/);
	});

	it('taking an alarm out of service with a blank reason says why, at that alarm, and keeps what was typed', async () => {
		const corrin = ids['corrin-bay/port'];
		const path = `/vessels/${corrin.vessel}/shafts/${corrin.shaft}?/service`;
		const fields = { type: 'low_flow', out_of_service: 'true', reason: '   ' };
		const answer = await postAction(chief, server.env.ORIGIN, path, fields);
		expect(answer.failure).toBe(400);
		expect(answer.data!.service).toMatchObject({ type: 'low_flow', reason: '   ' });
		expect(Object.keys(answer.data!.service.errors)).toEqual(['reason']);
		// without JavaScript the page itself comes back with the error shown
		const page = await fetch(server.url + path, {
			method: 'POST',
			headers: { cookie: chief.cookie!, origin: server.env.ORIGIN, accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded' },
			body: new URLSearchParams(fields)
		});
		expect(page.status).toBe(400);
		const html = await page.text();
		expect(html).toContain('role="alert"');
		expect(html).toContain(answer.data!.service.errors.reason);
	});

	it('the fleet table lists only the shafts the caller may see', async () => {
		const mine = await (
			await chief.get('/api/compliance?from=2026-01-01T00:00:00Z&to=2026-01-02T00:00:00Z')
		).json();
		expect(mine.rows.map((r: { vessel: { code: string } }) => r.vessel.code).sort()).toEqual([
			'corrin-bay',
			'corrin-bay',
			'skerry-lark',
			'skerry-lark'
		]);
		const all = await (
			await shore.get('/api/compliance?from=2026-01-01T00:00:00Z&to=2026-01-02T00:00:00Z')
		).json();
		expect(all.rows).toHaveLength(Object.keys(ids).length);
	});
});

describe('roles', () => {
	it('shore office and technicians read and export but may not upload', async () => {
		const port = ids['corrin-bay/port'].shaft;
		for (const c of [shore, tech]) {
			expect((await c.get(`/api/shafts/${port}/samples`)).status).toBe(200);
			expect((await c.get(`/api/shafts/${port}/compliance`)).status).toBe(200);
			const csv = await c.get(`/api/shafts/${port}/export.csv`);
			expect(csv.status).toBe(200);
			expect(csv.headers.get('content-type')).toMatch(/^text\/csv/);
			const res = await upload(c, port, 'log.csv', 'time,flow\n2026-01-01T00:00:00Z,70\n');
			expect(res.status).toBe(403);
		}
	});
});

describe('uploads over HTTP', () => {
	it('refuses the wrong type (415) and a file over 20 MB (413)', async () => {
		const port = ids['corrin-bay/port'].shaft;
		const pdf = await upload(chief, port, 'log.pdf', '%PDF-1.4', 'application/pdf');
		expect(pdf.status).toBe(415);
		const big = new Uint8Array(21 * 1024 * 1024).fill(0x32); // 21 MiB, under adapter-node's 25M body limit
		const res = await upload(chief, port, 'big.csv', big);
		expect(res.status).toBe(413);
		expect((await res.json()).error.code).toBe('too_large');
	});

	it('a body sent without a length (chunked) past the server’s body limit is a 413, raw or multipart', async () => {
		const port = ids['corrin-bay/port'].shaft;
		// 26 MiB in 1 MiB chunks, past the 25M BODY_SIZE_LIMIT the server runs with (as npm start sets it)
		const chunked = (prefix: string) => {
			let sent = 0;
			const chunk = new Uint8Array(1024 * 1024).fill(0x33);
			return new ReadableStream<Uint8Array>({
				pull(controller) {
					if (sent === 0) controller.enqueue(new TextEncoder().encode(prefix));
					if (sent++ >= 26) controller.close();
					else controller.enqueue(chunk);
				}
			});
		};
		for (const [type, prefix] of [
			['text/csv', ''],
			['multipart/form-data; boundary=xx', '--xx\r\ncontent-disposition: form-data; name="file"; filename="big.csv"\r\ncontent-type: text/csv\r\n\r\n']
		]) {
			const res = await fetch(`${server.url}/api/shafts/${port}/imports`, {
				method: 'POST',
				headers: { cookie: chief.cookie!, 'content-type': type, origin: new URL(server.url).origin },
				body: chunked(prefix),
				duplex: 'half'
			} as RequestInit);
			expect(res.status, type).toBe(413);
			expect((await res.json()).error.code).toBe('too_large');
		}
	});

	it('a script may send the file as the body; a form post from another origin is refused', async () => {
		const port = ids['corrin-bay/port'].shaft;
		const res = await chief.request(
			'POST',
			`/api/shafts/${port}/imports?filename=script.csv`,
			'time,flow\n2026-01-01T00:00:00Z,70\n',
			{ 'content-type': 'text/csv' }
		);
		expect(res.status).toBe(201);
		expect((await res.json()).import.filename).toBe('script.csv');
		const form = new FormData();
		form.set('file', new File(['time,flow\n'], 'x.csv', { type: 'text/csv' }));
		const foreign = await fetch(`${server.url}/api/shafts/${port}/imports`, {
			method: 'POST',
			body: form,
			headers: { cookie: chief.cookie!, origin: 'https://elsewhere.example' }
		});
		expect(foreign.status).toBe(403);
	});

	it('uploads, previews, imports; the samples API and the pages then show it', async () => {
		const { shaft, vessel } = ids['corrin-bay/stbd'];
		// ten rows a second apart in UTC, 70 L/min (above 63); the third repeats the second's time
		const t0 = Date.UTC(2026, 0, 10, 12, 0, 0);
		const lines = ['time,flow lpm'];
		for (let i = 0; i < 10; i++) lines.push(`${new Date(t0 + i * 1000).toISOString()},70`);
		lines.splice(3, 0, `${new Date(t0 + 1000).toISOString()},71`);
		const res = await upload(chief, shaft, 'stbd.csv', lines.join('\n'));
		expect(res.status).toBe(201);
		const preview = await res.json();
		expect(preview.report).toMatchObject({
			rows_total: 11,
			rows_new: 10,
			rows_duplicate_in_file: 1
		});

		const committed = await chief.post(`/api/shafts/${shaft}/imports/${preview.import.id}/commit`, {
			mapping: preview.report.mapping
		});
		expect(committed.status).toBe(200);
		expect((await committed.json()).import.rows_imported).toBe(10);

		const raw = await (
			await shore.get(`/api/shafts/${shaft}/samples?from=${t0}&to=${t0 + 60_000}`)
		).json();
		expect(raw.bucket).toBe('raw');
		expect(raw.samples.map((s: { flow_lpm: number }) => s.flow_lpm)).toEqual(Array(10).fill(70));
		const minutes = await (
			await shore.get(`/api/shafts/${shaft}/samples?bucket=1m&from=${t0}&to=${t0 + 60_000}`)
		).json();
		// 10 samples, 1 s apart: 9 s held, the last has no successor yet
		expect(minutes.buckets).toEqual([
			{
				ts: t0,
				n: 10,
				flow_lpm: { min: 70, max: 70, mean: 70 },
				supply_bar: null,
				temp_c: null,
				shaft_rpm: null,
				seconds_below_min: 0,
				covered_s: 9
			}
		]);
		// only the quantities asked for are read; an unknown one is a 400
		const flowOnly = await (
			await shore.get(`/api/shafts/${shaft}/samples?fields=flow_lpm&from=${t0}&to=${t0 + 60_000}`)
		).json();
		expect(flowOnly.samples[0]).toEqual({
			ts: t0,
			flow_lpm: 70,
			supply_bar: null,
			temp_c: null,
			shaft_rpm: null
		});
		expect((await shore.get(`/api/shafts/${shaft}/samples?fields=flow_lpm,depth_m`)).status).toBe(
			400
		);

		const page = await chief.get(`/vessels/${vessel}/uploads/${preview.import.id}`);
		expect(page.status).toBe(200);
		expect(await page.text()).toContain('stbd.csv');
		// an import of this vessel is not found under another vessel the user may see
		expect(
			(await chief.get(`/vessels/${ids['skerry-lark/port'].vessel}/uploads/${preview.import.id}`))
				.status
		).toBe(404);
		const original = await shore.get(`/api/shafts/${shaft}/imports/${preview.import.id}/original`);
		expect(await original.text()).toBe(lines.join('\n'));
	});
});

describe('history API', () => {
	it('raw samples are capped at a day, with the bucket to ask for instead', async () => {
		const port = ids['corrin-bay/port'].shaft;
		const res = await shore.get(
			`/api/shafts/${port}/samples?from=2026-01-01T00:00:00Z&to=2026-01-03T00:00:00Z`
		);
		expect(res.status).toBe(400);
		const body = await res.json();
		expect(body.error).toMatchObject({ code: 'range_too_long', fields: { bucket: '1m' } });
		const auto = await (
			await shore.get(
				`/api/shafts/${port}/samples?bucket=auto&from=2026-01-01T00:00:00Z&to=2026-01-31T00:00:00Z`
			)
		).json();
		expect(auto.bucket).toBe('1h');
		expect((await shore.get(`/api/shafts/${port}/samples?from=yesterday`)).status).toBe(400);
	});

	it('1-minute buckets are capped at 31 days and 1-hour buckets at five years, so no answer stalls the server', async () => {
		const port = ids['corrin-bay/port'].shaft;
		const ask = (bucket: string, from: string, to: string) =>
			shore.get(`/api/shafts/${port}/samples?bucket=${bucket}&from=${from}&to=${to}`);
		expect((await ask('1m', '2026-01-01T00:00:00Z', '2026-02-01T00:00:00Z')).status).toBe(200); // 31 days
		const month = await ask('1m', '2026-01-01T00:00:00Z', '2026-02-01T00:00:01Z');
		expect(month.status).toBe(400);
		expect((await month.json()).error).toMatchObject({ code: 'range_too_long', fields: { bucket: '1h' } });
		expect((await ask('1h', '2021-01-01T00:00:00Z', '2026-01-01T00:00:00Z')).status).toBe(200);
		const decade = await ask('auto', '2006-01-01T00:00:00Z', '2026-01-01T00:00:00Z');
		expect(decade.status).toBe(400);
		expect((await decade.json()).error.message).toMatch(/five years.*CSV/);
	});

	it('the export is streamed, not sized in advance, and named for what it holds', async () => {
		const port = ids['corrin-bay/port'].shaft;
		const res = await shore.get(
			`/api/shafts/${port}/export.csv?from=2026-01-01T00:00:00Z&to=2026-01-02T00:00:00Z`
		);
		expect(res.headers.get('content-length')).toBeNull();
		expect(res.headers.get('content-disposition')).toBe(
			'attachment; filename="corrin-bay_port_samples_20260101T0000Z_20260102T0000Z.csv"'
		);
		expect((await res.text()).split('\n')[0]).toBe(
			'time (UTC),flow (L/min),supply pressure (bar),water temperature (°C),shaft speed (rpm)'
		);
	});
});

describe('pages', () => {
	it('history, fleet compliance, report and uploads open for the shore office', async () => {
		const v = ids['corrin-bay/port'].vessel;
		for (const path of [`/vessels/${v}/history?range=7d`, '/compliance', `/vessels/${v}/uploads`]) {
			expect([path, (await shore.get(path)).status]).toEqual([path, 200]);
		}
		const report = await shore.get(`/vessels/${v}/report?range=30d`);
		expect(report.status).toBe(200);
		const html = await report.text();
		expect(html).toContain('Maren Holt'); // who produced it
		expect(html).toContain('Print / save as PDF');
		expect(html).toContain('never replaces, the vessel’s approved alarm and monitoring system');
	});
});
