/**
 * `npm run simulate -- [options]`: plays vessel gateways against an MQTT broker.
 * Ctrl-C or SIGTERM stops cleanly (each gateway publishes its offline status).
 */
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { z } from 'zod';
import { gatewayUsername, demoGatewayPassword } from '../src/lib/server/demo/fleet';
import { FAULT_DESCRIPTIONS, FAULTS, formatFaultSpec, parseFaultSpec } from './faults';
import { generatedFleet } from './fleet';
import {
	DEFAULT_DEMO_PASSWORD,
	DEFAULT_PREFIX,
	DEFAULT_URL,
	MAX_RATE_HZ,
	startSimulator,
	type Credentials
} from './simulator';

const HELP = `Aftwater gateway simulator

Usage: npm run simulate -- [options]

  --url URL              broker (default $MQTT_URL or ${DEFAULT_URL})
  --prefix P             topic prefix (default ${DEFAULT_PREFIX})
  --password PW          demo password the gateway passwords derive from
                         (default $DEMO_PASSWORD or ${DEFAULT_DEMO_PASSWORD})
  --demo                 play the demo fleet (the default without --vessels)
  --vessels N            play N generated vessels sim-001… (1–4 shafts each) instead
  --credentials FILE     JSON {"vessel-code": {"username", "password"}, …} for the gateways
  --rate HZ              samples per second per shaft, up to ${MAX_RATE_HZ} (default 1; 0.2 = every 5 s)
  --seed N               seed for reproducible runs (default 1)
  --timetable            play the demo fault timetable (default on for the demo fleet)
  --no-timetable         do not
  --fault F:VESSEL[/SHAFT]  turn a fault on at start; repeatable
  --standby-delay S      standby pump start delay after a trip, s (default 45)
  --offline-s S          length of an offline outage, s (default 60)
  -h, --help             this text

Faults:
${FAULTS.map((f) => `  ${f.padEnd(18)} ${FAULT_DESCRIPTIONS[f]}`).join('\n')}
`;

const credentialsFileSchema = z.record(
	z.string(),
	z.object({ username: z.string().min(1), password: z.string().min(1) })
);

function fail(message: string): never {
	console.error(`simulate: ${message}\n(see --help)`);
	process.exit(2);
}

function number(name: string, text: string | undefined, fallback: number): number {
	if (text === undefined) return fallback;
	const value = Number(text);
	if (!Number.isFinite(value)) fail(`--${name} must be a number, not "${text}"`);
	return value;
}

async function main(): Promise<void> {
	let parsed;
	try {
		parsed = parseArgs({
			options: {
				url: { type: 'string' },
				prefix: { type: 'string' },
				password: { type: 'string' },
				demo: { type: 'boolean' },
				vessels: { type: 'string' },
				credentials: { type: 'string' },
				rate: { type: 'string' },
				seed: { type: 'string' },
				timetable: { type: 'boolean' },
				'no-timetable': { type: 'boolean' },
				fault: { type: 'string', multiple: true },
				'standby-delay': { type: 'string' },
				'offline-s': { type: 'string' },
				help: { type: 'boolean', short: 'h' }
			},
			strict: true
		});
	} catch (err) {
		fail((err as Error).message);
	}
	const args = parsed.values;
	if (args.help) {
		console.log(HELP);
		return;
	}

	const seed = number('seed', args.seed, 1);
	const count = args.vessels === undefined ? null : number('vessels', args.vessels, 0);
	if (count !== null && (!Number.isInteger(count) || count < 1))
		fail('--vessels must be a whole number ≥ 1');
	if (count !== null && args.demo) fail('choose --demo or --vessels, not both');
	const vessels = count === null ? undefined : generatedFleet(count, seed);
	const demoPassword = args.password ?? process.env.DEMO_PASSWORD ?? DEFAULT_DEMO_PASSWORD;

	let credentials: ((code: string) => Credentials) | undefined;
	if (args.credentials) {
		let table: z.infer<typeof credentialsFileSchema>;
		try {
			table = credentialsFileSchema.parse(JSON.parse(readFileSync(args.credentials, 'utf8')));
		} catch (err) {
			fail(`cannot read credentials from ${args.credentials}: ${(err as Error).message}`);
		}
		credentials = (code) =>
			table[code] ?? {
				username: gatewayUsername(code),
				password: demoGatewayPassword(code, demoPassword)
			};
	}

	if (args.timetable && args['no-timetable'])
		fail('choose --timetable or --no-timetable, not both');
	const timetable = args['no-timetable'] ? false : (args.timetable ?? count === null);
	if (timetable && count !== null)
		console.log('[simulator] note: the timetable only acts on the demo fleet');

	let faults;
	try {
		faults = (args.fault ?? []).map(parseFaultSpec);
	} catch (err) {
		fail((err as Error).message);
	}

	const url = args.url ?? process.env.MQTT_URL ?? DEFAULT_URL;
	let simulator;
	try {
		simulator = await startSimulator({
			url,
			prefix: args.prefix,
			vessels,
			credentials,
			demoPassword,
			rateHz: number('rate', args.rate, 1),
			seed,
			timetable,
			faults,
			standbyDelayS: number('standby-delay', args['standby-delay'], 45),
			offlineS: number('offline-s', args['offline-s'], 60)
		});
	} catch (err) {
		fail((err as Error).message);
	}
	const sim = simulator;
	console.log(
		`[simulator] ${sim.vessels.length} gateway(s) against ${url}${timetable ? ', demo timetable on' : ''}`
	);

	let lastTotal = 0;
	const SUMMARY_S = 30;
	const summary = setInterval(() => {
		const s = sim.stats();
		const gws = sim.gateways();
		const online = gws.filter((g) => g.connected).length;
		const backlog = gws.reduce((n, g) => n + g.backlog, 0);
		const faultsOn = sim.activeFaults().map(formatFaultSpec).join(', ') || 'none';
		const perS = ((s.publishedTotal - lastTotal) / SUMMARY_S).toFixed(1);
		lastTotal = s.publishedTotal;
		console.log(
			`[simulator] ${s.publishedTotal} messages (${perS}/s), ${online}/${gws.length} online, ` +
				`backlog ${backlog}, replayed ${s.replayed}, commands ${s.commandsReceived} ` +
				`(ignored ${s.commandsIgnored}), faults: ${faultsOn}`
		);
	}, SUMMARY_S * 1000);

	let stopping = false;
	const shutdown = async (signal: string) => {
		if (stopping) process.exit(1); // a second Ctrl-C means now
		stopping = true;
		clearInterval(summary);
		console.log(`[simulator] ${signal}: publishing offline status and disconnecting`);
		await sim.stop();
		process.exit(0);
	};
	process.on('SIGINT', () => void shutdown('SIGINT'));
	process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

main().catch((err) => {
	console.error(err);
	process.exit(1);
});
