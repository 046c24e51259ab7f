/**
 * The other ingest source: an MQTT.js subscriber of an external broker (here
 * a plain aedes on a free port, standing in for any standard broker). Its
 * session is persistent, so what gateways publish while Aftwater is away is
 * delivered when it returns. Also: a server killed mid-ingest restarts with
 * an intact file and every committed sample.
 */
import { afterAll, describe, expect, it } from 'vitest';
import net from 'node:net';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import mqtt from 'mqtt';
import { Aedes } from 'aedes';
import { startTestApp } from './helpers/app';
import { freePort, waitFor } from './helpers/ports';
import { startServer } from './helpers/server';
import { connectGateway, telemetry } from './helpers/gateway';

const dirs: string[] = [];
afterAll(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

function countSamples(dbPath: string): number {
	const db = new Database(dbPath, { readonly: true });
	try {
		return (db.prepare('select count(*) as n from samples').get() as { n: number }).n;
	} finally {
		db.close();
	}
}

describe('external broker (MQTT_URL)', () => {
	it('starts no broker of its own and receives, through a persistent session, what was published while it was away', async () => {
		const broker = await Aedes.createBroker();
		const server = net.createServer(broker.handle);
		const port = await freePort();
		await new Promise<void>((r) => server.listen(port, '127.0.0.1', r));
		const dir = mkdtempSync(join(tmpdir(), 'aftwater-ext-'));
		dirs.push(dir);
		const dbPath = join(dir, 'aftwater.db');
		const env = { MQTT_URL: `mqtt://127.0.0.1:${port}`, DATABASE_PATH: dbPath };
		const gw = await mqtt.connectAsync(`mqtt://127.0.0.1:${port}`, { clientId: 'external-gw' });
		const publish = (ts: number, flow: number) =>
			gw.publishAsync(telemetry('corrin-bay', 'port'), JSON.stringify({ ts, flow_lpm: flow }), { qos: 1 });

		let app = await startTestApp(env);
		expect(app.ctx.services.telemetry!.broker).toBeNull();
		expect(app.ctx.services.telemetry!.source.kind).toBe('external');
		const t0 = Date.now() - 60_000;
		await publish(t0, 80);
		await waitFor(async () => (await app.ctx.services.telemetry!.pipeline.drain(), countSamples(dbPath) === 1), { what: 'the first sample' });
		await app.stop();

		// Aftwater is down: a gateway carries on publishing
		for (let i = 1; i <= 20; i++) await publish(t0 + i * 1000, 80 + i);

		app = await startTestApp(env);
		await waitFor(async () => (await app.ctx.services.telemetry!.pipeline.drain(), countSamples(dbPath) === 21), {
			what: 'the messages published while the subscriber was away',
			timeoutMs: 15_000
		});
		const rows = app.ctx.sqlite.prepare('select flow_lpm from samples order by ts').all() as { flow_lpm: number }[];
		expect(rows.map((r) => r.flow_lpm)).toEqual(Array.from({ length: 21 }, (_, i) => 80 + i));
		await app.stop();
		await gw.endAsync();
		await new Promise<void>((r) => broker.close(() => r()));
		await new Promise<void>((r) => server.close(() => r()));
	});
});

describe('crash', () => {
	it('a server killed mid-ingest restarts with integrity_check ok and no committed sample lost', async () => {
		const server = await startServer({ INGEST_FLUSH_MS: '50' });
		try {
			const gw = await connectGateway(server.mqttPort, 'hallow-tern');
			const t0 = Date.now() - 3_600_000;
			let i = 0;
			const burst = async (n: number) => {
				for (let k = 0; k < n; k++, i++) {
					gw.publish(telemetry('hallow-tern', 'main'), JSON.stringify({ ts: t0 + i * 100, flow_lpm: 150 + (i % 7) }), { qos: 1 });
				}
				await new Promise((r) => setTimeout(r, 50));
			};
			for (let k = 0; k < 20; k++) await burst(250);
			await waitFor(() => countSamples(server.dbPath) > 2000, { what: 'samples committed' });
			const committed = countSamples(server.dbPath);
			const more = burst(2000); // still ingesting when the power goes
			await server.stop({ keepData: true, signal: 'SIGKILL' });
			await more;
			gw.end(true);

			const db = new Database(server.dbPath);
			expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
			db.close();
			expect(countSamples(server.dbPath)).toBeGreaterThanOrEqual(committed);

			await server.restart();
			const health = await (await fetch(`${server.url}/api/health`)).json();
			expect(health.status).toBe('ok');
			expect(countSamples(server.dbPath)).toBeGreaterThanOrEqual(committed);
		} finally {
			await server.stop();
		}
	});
});
