/**
 * bench:live — publish → SSE receipt latency with many live clients.
 *
 * The built app runs in a child process (as `npm start` runs it); a bench
 * vessel with 4 shafts is created through the API; N clients (default 200)
 * hold `GET /api/vessels/{id}/live` open; a gateway publishes at 1 Hz per shaft
 * through the real broker, then in a burst. Each sample's ts is its publish
 * time, so receipt − ts is the latency through broker, ingest, fan-out and
 * HTTP. Also reports the server's memory per client. Not a test: it prints a
 * table and, last, one JSON line.
 *
 *   npm run bench:live -- [--clients 200] [--seconds 20] [--burst 200]
 */
import { execSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { parseArgs } from 'node:util';
import mqtt from 'mqtt';
import { startServer } from '../helpers/server';
import { signIn } from '../helpers/http';
import { openSse, type SseConnection } from '../helpers/sse';

const { values: args } = parseArgs({
	options: {
		clients: { type: 'string', default: '200' },
		seconds: { type: 'string', default: '20' },
		burst: { type: 'string', default: '200' }
	}
});
const CLIENTS = Number(args.clients);
const SECONDS = Number(args.seconds);
const BURST = Number(args.burst);
const ROOT = resolve(import.meta.dirname, '../..');

const rssKb = (pid: number) =>
	Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1] ?? 0);
const pct = (sorted: number[], p: number) =>
	sorted.length ? sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] : NaN;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

if (!existsSync(resolve(ROOT, 'build/index.js'))) {
	console.log('building the app (vite build)…');
	execSync('npx vite build', { cwd: ROOT, stdio: 'ignore' });
}

const server = await startServer({ SIMULATOR: 'off', DEMO: '1' });
try {
	const admin = await signIn(server.url, 'admin@demo.test');
	const vessel = (
		await (await admin.post('/api/vessels', { code: 'bench-live', name: 'Bench Live' })).json()
	).vessel;
	for (const [i, pos] of (['port', 'centre', 'centre', 'starboard'] as const).entries()) {
		await admin.post(`/api/vessels/${vessel.id}/shafts`, {
			code: `s${i + 1}`,
			name: `Shaft ${i + 1}`,
			position: pos,
			diameter_mm: 400,
			centreline_depth_m: 4
		});
	}
	const creds = await (await admin.post(`/api/vessels/${vessel.id}/gateway`)).json();
	const gw = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, {
		username: creds.username,
		password: creds.password
	});

	const pid = server.pid()!;
	await sleep(1000);
	const rssBefore = rssKb(pid);
	const viewer = await signIn(server.url, 'fleet@demo.test');
	const clients: SseConnection[] = [];
	for (let i = 0; i < CLIENTS; i++) {
		clients.push(
			await openSse(`${server.url}/api/vessels/${vessel.id}/live?window=5`, {
				cookie: viewer.cookie!
			})
		);
	}
	await sleep(2000);
	const rssAfter = rssKb(pid);
	const refused = clients.filter((c) => c.status !== 200).length;

	/** latency of every sample a client received after `from` (ms) */
	function latencies(from: number): number[] {
		const out: number[] = [];
		for (const c of clients) {
			for (const e of c.events) {
				if (e.event !== 'samples' || e.receivedAt < from) continue;
				const data = JSON.parse(e.data) as { shafts: Record<string, [number][]> };
				for (const rows of Object.values(data.shafts))
					for (const [ts] of rows) if (ts >= from) out.push(e.receivedAt - ts);
			}
		}
		return out.sort((a, b) => a - b);
	}
	const topic = (s: number) => `aftwater/v1/bench-live/s${s}/telemetry`;

	// steady: 1 Hz per shaft
	const steadyFrom = Date.now();
	for (let t = 0; t < SECONDS; t++) {
		const ts = Date.now();
		for (let s = 1; s <= 4; s++)
			gw.publish(topic(s), JSON.stringify({ ts, flow_lpm: 100 + s, supply_bar: 1.2 }), { qos: 0 });
		await sleep(1000);
	}
	await sleep(500);
	const steady = latencies(steadyFrom);
	const expected = SECONDS * 4 * (CLIENTS - refused);

	// burst: BURST samples per shaft as fast as the broker takes them
	const burstFrom = Date.now() + 1;
	await sleep(5);
	for (let k = 0; k < BURST; k++) {
		const ts = Date.now();
		for (let s = 1; s <= 4; s++)
			gw.publish(topic(s), JSON.stringify({ ts: ts + k, flow_lpm: 100 }), { qos: 0 });
	}
	await sleep(3000);
	const burst = latencies(burstFrom);

	const result = {
		clients: CLIENTS,
		refused,
		steady_samples_received: steady.length,
		steady_samples_expected: expected,
		p50_ms: pct(steady, 50),
		p95_ms: pct(steady, 95),
		p99_ms: pct(steady, 99),
		burst_samples_received: burst.length,
		burst_p50_ms: pct(burst, 50),
		burst_p95_ms: pct(burst, 95),
		burst_p99_ms: pct(burst, 99),
		server_rss_kb_per_client: Math.round(((rssAfter - rssBefore) / CLIENTS) * 10) / 10,
		target_p95_ms: 100,
		pass: pct(steady, 95) < 100 && steady.length === expected
	};
	console.log('\nbench:live — publish → SSE receipt, one vessel of 4 shafts at 1 Hz per shaft');
	console.table({
		steady: {
			clients: CLIENTS,
			received: `${steady.length}/${expected}`,
			p50: result.p50_ms,
			p95: result.p95_ms,
			p99: result.p99_ms
		},
		burst: {
			clients: CLIENTS,
			received: burst.length,
			p50: result.burst_p50_ms,
			p95: result.burst_p95_ms,
			p99: result.burst_p99_ms
		}
	});
	console.log(
		`server memory: ${result.server_rss_kb_per_client} kB per client (RSS ${rssBefore} → ${rssAfter} kB)`
	);
	console.log(`target p95 < 100 ms at ${CLIENTS} clients: ${result.pass ? 'met' : 'NOT met'}`);
	for (const c of clients) c.close();
	await gw.endAsync();
	console.log(JSON.stringify(result));
} finally {
	await server.stop();
}
