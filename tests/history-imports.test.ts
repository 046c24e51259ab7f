/**
 * Logger uploads and CSV export, in process: the route modules are called
 * with a request event (hooks' vessel-scope check is covered over HTTP in
 * history-http.test.ts). Imported rows go through the real ingest pipeline
 * into the real SQLite file.
 */
import { constantMinimum } from '$lib/minimums';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appUser, shaftIds, startTestApp, type TestApp } from './helpers/app';
import { routeEvent } from './helpers/route';
import * as users from '$lib/server/users/repository';
import { samplesCsv } from '$lib/server/history/export';
import { coverageOf } from '$lib/server/history/compliance';
import { shaftHistory, type ShaftHistory } from '$lib/server/history/shaft-context';
import { MAX_UPLOAD_BYTES } from '$lib/history/import/sniff';
import { recoverInterruptedImports } from '$lib/server/history/imports/service';
import type { ImportMapping } from '$lib/history/import/mapping';
import * as uploadsApi from '../src/routes/api/shafts/[shaftId=id]/imports/+server';
import * as importApi from '../src/routes/api/shafts/[shaftId=id]/imports/[importId=id]/+server';
import * as previewApi from '../src/routes/api/shafts/[shaftId=id]/imports/[importId=id]/preview/+server';
import * as commitApi from '../src/routes/api/shafts/[shaftId=id]/imports/[importId=id]/commit/+server';
import * as originalApi from '../src/routes/api/shafts/[shaftId=id]/imports/[importId=id]/original/+server';
import * as exportApi from '../src/routes/api/shafts/[shaftId=id]/export.csv/+server';

let app: TestApp;
let chief: users.AppUser;
let shore: users.AppUser;
let tech: users.AppUser;
let oslo: ShaftHistory; // corrin-bay (Europe/Oslo) port shaft, 63 L/min minimum
let lark: ShaftHistory; // skerry-lark port, 150 mm × 0.15 = 22.5 L/min
let larkStbd: ShaftHistory;

const HOUR = 3_600_000;

const user = (email: string) => appUser(app.ctx, email);

async function shaft(vessel: string, code: string) {
	return (await shaftHistory(app.ctx, (await shaftIds(app.ctx, vessel, code)).shaftId))!;
}

const event = (
	u: users.AppUser,
	params: Record<string, string | number>,
	{ query, ...init }: { method?: string; body?: BodyInit; json?: unknown; query?: string } = {}
) => routeEvent({ ...init, path: `/api/test${query ? `?${query}` : ''}`, params, user: u });

function upload(
	u: users.AppUser,
	h: ShaftHistory,
	name: string,
	content: string | Uint8Array<ArrayBuffer>,
	type = 'text/csv'
) {
	const form = new FormData();
	form.set('file', new File([content], name, { type }));
	return uploadsApi.POST(event(u, { shaftId: h.shaft.id }, { body: form }));
}

async function uploaded(u: users.AppUser, h: ShaftHistory, name: string, content: string) {
	const res = await upload(u, h, name, content);
	expect(res.status, await res.clone().text()).toBe(201);
	return res.json();
}

const commit = (u: users.AppUser, h: ShaftHistory, id: number, mapping: ImportMapping) =>
	commitApi.POST(event(u, { shaftId: h.shaft.id, importId: id }, { json: { mapping } }));

const stored = (h: ShaftHistory, from: number, to: number) =>
	app.ctx.db
		.selectFrom('samples')
		.select(['ts', 'flow_lpm', 'supply_bar', 'temp_c', 'shaft_rpm'])
		.where('shaft_id', '=', h.shaft.id)
		.where('ts', '>=', from)
		.where('ts', '<', to)
		.orderBy('ts')
		.execute();

beforeAll(async () => {
	app = await startTestApp({ ALARM_RULES: '0' });
	chief = await user('chief@demo.test'); // chief engineer of corrin-bay and skerry-lark
	shore = await user('shore@demo.test');
	tech = await user('tech@demo.test');
	oslo = await shaft('corrin-bay', 'port');
	lark = await shaft('skerry-lark', 'port');
	larkStbd = await shaft('skerry-lark', 'stbd');
});
afterAll(() => app?.stop());

describe('upload checks', () => {
	it('refuses a file that is not CSV by its name or by its bytes (415)', async () => {
		const pdf = await upload(chief, oslo, 'report.pdf', '%PDF-1.7 …', 'application/pdf');
		expect(pdf.status).toBe(415);
		expect((await pdf.json()).error.code).toBe('unsupported_type');
		// an .xlsx renamed to .csv: the bytes start with the ZIP signature PK\3\4
		const zip = await upload(
			chief,
			oslo,
			'log.csv',
			new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 6, 0])
		);
		expect(zip.status).toBe(415);
		expect((await zip.json()).error).toMatchObject({ code: 'not_text' });
		const none = await uploadsApi.POST(
			event(chief, { shaftId: oslo.shaft.id }, { body: new FormData() })
		);
		expect(none.status).toBe(422);
	});

	it('refuses a file over 20 MB (413)', async () => {
		const big = new Uint8Array(MAX_UPLOAD_BYTES + 1).fill(0x31); // "1111…": text, but one byte too many
		const res = await upload(chief, oslo, 'big.csv', big);
		expect(res.status).toBe(413);
		expect((await res.json()).error.code).toBe('too_large');
		expect(
			await app.ctx.db
				.selectFrom('logger_imports')
				.select('id')
				.where('filename', '=', 'big.csv')
				.execute()
		).toEqual([]);
	});

	it('an empty file is a 422 that says so', async () => {
		const res = await upload(chief, oslo, 'empty.csv', '');
		expect(res.status).toBe(422);
		expect((await res.json()).error).toMatchObject({ code: 'empty', message: 'the file is empty' });
	});

	it('a file csv-parse cannot split is a 422 with the reason, and leaves no import behind', async () => {
		const res = await upload(chief, oslo, 'open-quote.csv', 'ts,flow_lpm\n"2026-01-01T00:00:00Z,100\n2026-01-01T00:00:01Z,101\n');
		expect(res.status).toBe(422);
		const { error } = await res.json();
		expect(error.code).toBe('unreadable_file');
		expect(error.message).toMatch(/quote/i);
		const rows = await app.ctx.db.selectFrom('logger_imports').select('id').where('filename', '=', 'open-quote.csv').execute();
		expect(rows).toEqual([]);
	});

	it('a row whose epoch time no date can hold is a bad row named by its line, not a failure', async () => {
		// 8.7e15 ms is past the last instant a Date can hold, 8.64e15 (ECMA-262 §21.4.1.1)
		const body = await uploaded(chief, oslo, 'far-future.csv', 'ts,flow_lpm\n8700000000000000,100\n1767225600000,100\n');
		expect(body.report.rows_bad).toBe(1);
		expect(body.report.problems).toEqual([{ line: 2, kind: 'out_of_range', message: 'ts: not a time: beyond the last date there is' }]);
	});

	it('only an admin or chief engineer may upload; shore office and technicians get 403', async () => {
		for (const u of [shore, tech]) {
			const res = await upload(u, oslo, 'log.csv', 'time,flow\n2026-01-01T00:00:00Z,70\n');
			expect(res.status).toBe(403);
		}
	});
});

describe('naive times in a stated zone, bad rows, duplicates', () => {
	// A Norwegian logger: semicolons, decimal commas, local time without offset, across the
	// start of summer time (EU: 2026-03-29 01:00 UTC, local 02:00 → 03:00; Directive 2000/84/EC).
	const csv = [
		'Zeit;Durchfluss l/min;Druck kPa;Temp °C',
		'29.03.2026 01:59:50;70,5;120;8,5', // line 2: CET (UTC+1) → 00:59:50Z
		'29.03.2026 01:59:55;70,0;120;8,5', // line 3 → 00:59:55Z
		'29.03.2026 02:30:00;70,0;120;8,5', // line 4: does not exist in Oslo
		'29.03.2026 03:00:00;69,5;121;8,6', // line 5: CEST (UTC+2) → 01:00:00Z
		'29.03.2026 03:00:05;-4;121;8,6', // line 6: a negative flow fails the telemetry contract
		'29.03.2026 03:00:10;abc;121;8,6', // line 7: not a number
		'29.03.2026 03:00:10;69,0;121;8,6', // line 8 → 01:00:10Z
		'29.03.2026 03:00:10;69,0;121;8,6', // line 9: the same time again in the file
		'29.03.2026 03:00:15;68,5;;8,6' // line 10: no pressure is fine → 01:00:15Z
	].join('\r\n');

	it('previews with the suggested mapping, naming each bad row by its line', async () => {
		const body = await uploaded(chief, oslo, 'oslo-logger.csv', csv);
		expect(body.table.delimiter).toBe(';');
		expect(body.import.status).toBe('previewed');
		expect(body.report.mapping).toMatchObject({
			header: true,
			decimal: ',',
			time: { column: 0, format: 'dmy', zone: 'Europe/Oslo' }, // the vessel's zone is the default
			flow: { column: 1, unit: 'lpm' },
			pressure: { column: 2, unit: 'kpa' },
			temperature: { column: 3, unit: 'c' }
		});
		expect(
			body.report.problems.map((p: { line: number; kind: string }) => [p.line, p.kind])
		).toEqual([
			[4, 'nonexistent_time'],
			[6, 'out_of_range'],
			[7, 'unreadable_number'],
			[9, 'duplicate_in_file']
		]);
		expect(body.report).toMatchObject({
			rows_total: 9,
			rows_bad: 3,
			rows_duplicate_in_file: 1,
			rows_already_stored: 0,
			rows_new: 5
		});
		// nothing is stored by a preview
		expect(await stored(oslo, Date.UTC(2026, 2, 29), Date.UTC(2026, 2, 30))).toEqual([]);
	});

	it('with bad rows set to reject, nothing is imported and the report says why (422)', async () => {
		const body = await uploaded(chief, oslo, 'oslo-logger.csv', csv);
		const res = await commit(chief, oslo, body.import.id, {
			...body.report.mapping,
			bad_rows: 'reject'
		});
		expect(res.status).toBe(422);
		const out = await res.json();
		expect(out.error.code).toBe('rows_rejected');
		expect(out.import.status).toBe('previewed');
		expect(await stored(oslo, Date.UTC(2026, 2, 29), Date.UTC(2026, 2, 30))).toEqual([]);
	});

	it('skips bad rows, imports the rest at their UTC instants in SI units, and a second upload is all duplicates', async () => {
		const body = await uploaded(chief, oslo, 'oslo-logger.csv', csv);
		const res = await commit(chief, oslo, body.import.id, body.report.mapping);
		expect(res.status).toBe(200);
		const out = await res.json();
		expect(out.import).toMatchObject({
			status: 'imported',
			rows_total: 9,
			rows_imported: 5,
			rows_skipped: 3,
			rows_duplicate: 1
		});
		const rows = await stored(oslo, Date.UTC(2026, 2, 29), Date.UTC(2026, 2, 30));
		// kPa → bar: 120 kPa = 1.2 bar (1 bar = 100 kPa)
		expect(rows).toEqual([
			{
				ts: Date.UTC(2026, 2, 29, 0, 59, 50),
				flow_lpm: 70.5,
				supply_bar: 1.2,
				temp_c: 8.5,
				shaft_rpm: null
			},
			{
				ts: Date.UTC(2026, 2, 29, 0, 59, 55),
				flow_lpm: 70,
				supply_bar: 1.2,
				temp_c: 8.5,
				shaft_rpm: null
			},
			{
				ts: Date.UTC(2026, 2, 29, 1, 0, 0),
				flow_lpm: 69.5,
				supply_bar: 1.21,
				temp_c: 8.6,
				shaft_rpm: null
			},
			{
				ts: Date.UTC(2026, 2, 29, 1, 0, 10),
				flow_lpm: 69,
				supply_bar: 1.21,
				temp_c: 8.6,
				shaft_rpm: null
			},
			{
				ts: Date.UTC(2026, 2, 29, 1, 0, 15),
				flow_lpm: 68.5,
				supply_bar: null,
				temp_c: 8.6,
				shaft_rpm: null
			}
		]);
		// the rollups include them: 00:59:50 → 01:00:15 held sample to sample, gaps ≤ 30 s, all above 63 L/min → 25 s
		const cov = await coverageOf(
			app.ctx.db,
			oslo.shaft.id,
			Date.UTC(2026, 2, 29),
			Date.UTC(2026, 2, 30),
			oslo.gapMs,
			oslo.minimums
		);
		expect([cov.covered_ms, cov.below_ms, cov.flow_min]).toEqual([25_000, 0, 68.5]);

		// the same file again: every good row is already stored
		const again = await uploaded(chief, oslo, 'oslo-logger-copy.csv', csv);
		expect(again.notes.some((n: string) => /same file was imported/.test(n))).toBe(true);
		expect(again.report).toMatchObject({ rows_already_stored: 5, rows_new: 0 });
		const second = await (await commit(chief, oslo, again.import.id, again.report.mapping)).json();
		expect(second.import).toMatchObject({
			status: 'imported',
			rows_imported: 0,
			rows_duplicate: 6
		});
		expect(await stored(oslo, Date.UTC(2026, 2, 29), Date.UTC(2026, 2, 30))).toHaveLength(5);
		// an imported file cannot be imported twice, nor discarded
		expect((await commit(chief, oslo, body.import.id, body.report.mapping)).status).toBe(409);
		expect(
			(
				await importApi.DELETE(
					event(chief, { shaftId: oslo.shaft.id, importId: body.import.id }, { method: 'DELETE' })
				)
			).status
		).toBe(409);
	});

	it('a stated zone changes the instants: the same file read as UTC', async () => {
		const body = await uploaded(chief, larkStbd, 'utc-logger.csv', csv);
		const mapping = { ...body.report.mapping, time: { ...body.report.mapping.time, zone: 'UTC' } };
		const preview = await (
			await previewApi.POST(
				event(
					chief,
					{ shaftId: larkStbd.shaft.id, importId: body.import.id },
					{ json: { mapping } }
				)
			)
		).json();
		// in UTC 02:30 exists: only the negative flow, the letters and the repeated time are bad
		expect(preview.report.problems.map((p: { line: number }) => p.line)).toEqual([6, 7, 9]);
		expect(preview.report.first_rows[0].ts).toBe(Date.UTC(2026, 2, 29, 1, 59, 50));
	});

	it('an import of one shaft is not found under another shaft', async () => {
		const body = await uploaded(chief, oslo, 'x.csv', 'time,flow\n2026-01-01T00:00:00Z,70\n');
		const res = await importApi.GET(
			event(chief, { shaftId: lark.shaft.id, importId: body.import.id })
		);
		expect(res.status).toBe(404);
		expect(
			(await importApi.GET(event(shore, { shaftId: oslo.shaft.id, importId: body.import.id })))
				.status
		).toBe(200);
		// an upload never imported may be discarded, by someone who may upload
		const params = { shaftId: oslo.shaft.id, importId: body.import.id };
		expect((await importApi.DELETE(event(shore, params, { method: 'DELETE' }))).status).toBe(403);
		expect((await importApi.DELETE(event(chief, params, { method: 'DELETE' }))).status).toBe(200);
		expect((await importApi.GET(event(chief, params))).status).toBe(404);
	});
});

describe('CSV export', () => {
	it('re-imports to the same samples, and the shore office may download both the export and the original', async () => {
		const t0 = Math.floor((Date.now() - 2 * 86_400_000) / HOUR) * HOUR + 12_345;
		const rows = Array.from({ length: 900 }, (_, i) => ({
			ts: t0 + i * 1000 + (i % 7) * 3, // not on whole seconds, so milliseconds must survive
			flow_lpm: 60 + Math.sin(i / 30) * 10 + i / 1e4, // fractions that need every digit
			...(i % 5 ? { supply_bar: 1 + i / 1000 } : {}),
			...(i % 3 ? { temp_c: 12.25 - i / 100 } : {}),
			...(i % 2 ? { shaft_rpm: -80 } : {})
		}));
		rows.splice(400, 60); // a 61 s gap: unknown time, and it must stay a gap
		for (const r of rows)
			app.ctx.services.telemetry!.pipeline.handle(oslo.topic, Buffer.from(JSON.stringify(r)));
		await app.ctx.services.telemetry!.pipeline.drain();
		const from = t0;
		const to = t0 + 900_000;

		// shore office may export (small pages, so the stream has many chunks)
		const res = await exportApi.GET(
			event(shore, { shaftId: oslo.shaft.id }, { query: `from=${from}&to=${to}` })
		);
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
		expect(res.headers.get('content-disposition')).toMatch(/corrin-bay_port_samples_/);
		const text = await res.text();
		const lines = text.trimEnd().split('\n');
		expect(lines[0]).toBe(
			'time (UTC),flow (L/min),supply pressure (bar),water temperature (°C),shaft speed (rpm)'
		);
		expect(lines).toHaveLength(1 + rows.length);
		expect(lines[1].split(',')[0]).toBe(new Date(rows[0].ts).toISOString());

		let chunks = 0;
		const reader = samplesCsv(app.ctx.sqlite, oslo.shaft.id, from, to, 100).getReader();
		for (;;) {
			const { done } = await reader.read();
			if (done) break;
			chunks++;
		}
		expect(chunks).toBe(1 + Math.ceil(rows.length / 100)); // the header, then one chunk per page

		// re-import into another shaft with the suggested mapping, unchanged
		const body = await uploaded(chief, lark, 'export.csv', text);
		expect(body.report.problems).toEqual([]);
		const out = await (await commit(chief, lark, body.import.id, body.report.mapping)).json();
		expect(out.import.rows_imported).toBe(rows.length);
		expect(await stored(lark, from, to)).toEqual(await stored(oslo, from, to));
		// and its rollups say the same: same samples, same coverage (the two minimums differ, so compare coverage only)
		const a = await coverageOf(app.ctx.db, oslo.shaft.id, from, to, oslo.gapMs, constantMinimum(0));
		const b = await coverageOf(app.ctx.db, lark.shaft.id, from, to, lark.gapMs, constantMinimum(0));
		expect(b.covered_ms).toBe(a.covered_ms);
		expect(a.covered_ms).toBeLessThan(to - from); // the gap is not covered

		// the original file, byte for byte, for anyone who may see the vessel
		const orig = await originalApi.GET(
			event(shore, { shaftId: lark.shaft.id, importId: body.import.id })
		);
		expect(orig.status).toBe(200);
		expect(await orig.text()).toBe(text);

		// 1-minute buckets: one row per minute that has data, with the minute's coverage
		const minutes = await exportApi.GET(
			event(shore, { shaftId: oslo.shaft.id }, { query: `bucket=1m&from=${from}&to=${to}` })
		);
		const rowsOut = (await minutes.text()).trimEnd().split('\n');
		expect(rowsOut[0]).toBe(
			'bucket start (UTC),samples,flow min (L/min),flow mean (L/min),flow max (L/min),supply pressure mean (bar),water temperature mean (°C),shaft speed mean (rpm),time with data (s),time below minimum (s)'
		);
		const stored1m = await app.ctx.db
			.selectFrom('rollup_1m')
			.select(['bucket', 'n', 'covered_ms'])
			.where('shaft_id', '=', oslo.shaft.id)
			.where('bucket', '>=', Math.floor(from / 60_000) * 60_000)
			.where('bucket', '<', to)
			.orderBy('bucket')
			.execute();
		expect(
			rowsOut
				.slice(1)
				.map((l) => l.split(','))
				.map((c) => [Date.parse(c[0]), Number(c[1]), Number(c[8]) * 1000])
		).toEqual(stored1m.map((r) => [r.bucket, r.n, r.covered_ms]));
	});

	it('exports alarms with units and ISO times', async () => {
		const raised = Date.UTC(2026, 1, 3, 4, 5, 6);
		await app.ctx.db
			.insertInto('alarms')
			.values({
				vessel_id: oslo.vessel.id,
				shaft_id: oslo.shaft.id,
				type: 'low_flow',
				priority: 'alarm',
				state: 'normal',
				active: 0,
				acknowledged: 1,
				raised_at: raised,
				ended_at: raised + 90_000,
				value: 51.5,
				limit_value: 63,
				suppressed: 0,
				out_of_service: 0,
				updated_at: raised,
				acknowledged_by: 'chief@demo.test',
				acknowledged_at: raised + 30_000
			})
			.execute();
		const res = await exportApi.GET(
			event(
				shore,
				{ shaftId: oslo.shaft.id },
				{ query: `kind=alarms&from=2026-02-03T00:00:00Z&to=2026-02-04T00:00:00Z` }
			)
		);
		const lines = (await res.text()).trimEnd().split('\n');
		expect(lines[0]).toMatch(
			/^alarm id,source,type,priority,raised \(UTC\),returned to normal \(UTC\),duration \(s\)/
		);
		expect(lines).toHaveLength(2);
		expect(lines[1]).toContain(
			',shaft,low_flow,alarm,2026-02-03T04:05:06.000Z,2026-02-03T04:06:36.000Z,90,normal,51.5,63,L/min,'
		);
	});

	it('a bad period is a 400 that names the parameter', async () => {
		const res = await exportApi.GET(
			event(shore, { shaftId: oslo.shaft.id }, { query: 'from=2026-02-03T00:00:00&to=now' })
		);
		expect(res.status).toBe(400);
		expect((await res.json()).error.fields).toHaveProperty('from');
	});

	it('a `to` at the first instant a Date holds is a 400 naming it, not a failure: the default `from` stays in range', async () => {
		// −8.64e15 ms is the earliest time value (ECMA-262 §21.4.1.1); a day before it is none
		const res = await exportApi.GET(event(shore, { shaftId: oslo.shaft.id }, { query: 'to=-8640000000000000' }));
		expect(res.status).toBe(400);
		expect((await res.json()).error.fields).toHaveProperty('to');
	});
});

describe('an import interrupted by a stop', () => {
	it('is marked failed at the next start, and then imports once', async () => {
		const csv = 'time,flow\n2026-05-01T00:00:00Z,80\n2026-05-01T00:00:01Z,81\n';
		const body = await uploaded(chief, lark, 'interrupted.csv', csv);
		// the state a crash mid-commit leaves behind
		await app.ctx.db
			.updateTable('logger_imports')
			.set({ status: 'importing' })
			.where('id', '=', body.import.id)
			.execute();
		expect((await commit(chief, lark, body.import.id, body.report.mapping)).status).toBe(409);

		expect(await recoverInterruptedImports(app.ctx.db)).toBe(1);
		const row = await app.ctx.db
			.selectFrom('logger_imports')
			.select(['status', 'error'])
			.where('id', '=', body.import.id)
			.executeTakeFirstOrThrow();
		expect(row.status).toBe('failed');
		expect(row.error).toMatch(/interrupted by a server restart/);
		expect(await recoverInterruptedImports(app.ctx.db)).toBe(0);

		const res = await commit(chief, lark, body.import.id, body.report.mapping);
		expect(res.status).toBe(200);
		expect((await res.json()).import.rows_imported).toBe(2);
		expect(
			await stored(lark, Date.parse('2026-05-01T00:00:00Z'), Date.parse('2026-05-01T00:00:02Z'))
		).toHaveLength(2);
	});
});
