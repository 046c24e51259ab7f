/**
 * The gateway simulator obeys purge commands as a vessel's gateway would: its valve report
 * closes a command as done, with ΔP before and after; with its stuck-valve fault the purge is
 * missed and purge_missed raised — the demo's missed purge, end to end over MQTT.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isDue } from '$lib/purge';
import { startSimulator, type Simulator } from '../simulator/simulator';
import { demoFleet } from '../simulator/fleet';
import { startTestApp, type TestApp } from './helpers/app';
import { waitFor } from './helpers/ports';

let app: TestApp;
let sim: Simulator;
const chief = { userId: null, name: 'chief@demo.test' };
const purge = () => app.ctx.services.purge!;
const vesselId = (code: string) => app.ctx.services.telemetry!.registry.vessel(code)!.id;

async function decided(id: string) {
	return waitFor(
		async () => {
			const row = await app.ctx.db
				.selectFrom('purge_commands')
				.selectAll()
				.where('id', '=', id)
				.executeTakeFirstOrThrow();
			return row.outcome === 'pending' ? null : row;
		},
		{ timeoutMs: 20_000, what: `command ${id} decided` }
	);
}

beforeAll(async () => {
	app = await startTestApp();
	// a fixed instant at which no demo schedule is due: only these tests' commands are sent
	const jobs = purge().scheduler.jobs();
	let quiet = Date.parse('2031-01-06T00:00:30Z');
	while (jobs.some((j) => isDue(j.schedule, j.timeZone, quiet))) quiet += 60_000;
	purge().scheduler.clock = () => quiet;
	purge().setTolerances({ open_within_s: 3, report_lag_s: 1 });
	purge().verifier.dpAfterDelayMs = 3_000;
	sim = await startSimulator({
		url: `mqtt://127.0.0.1:${app.mqttPort}`,
		demoPassword: 'aftwater-demo',
		vessels: demoFleet().filter((v) => v.code === 'corrin-bay' || v.code === 'lakeline-wren'),
		separatorIntervalS: 0.5,
		log: () => {}
	});
	sim.setFault('lakeline-wren', 'stuck-valve', true);
	// a few seconds of ΔP readings before the purge, for "ΔP before"
	const pipeline = app.ctx.services.telemetry!.pipeline;
	await waitFor(() => pipeline.latestSeparator.get(vesselId('corrin-bay'))?.dp_bar != null, {
		what: 'ΔP readings'
	});
	await new Promise((r) => setTimeout(r, 2_000));
});
afterAll(async () => {
	await sim?.stop();
	await app?.stop();
});

describe('with the simulator as the vessels’ gateways', () => {
	it('a purge is obeyed, reported open then closed, and proved done with ΔP before and after', async () => {
		const view = await purge().purgeNow(vesselId('corrin-bay'), chief, 5);
		const row = await decided(view.id);
		expect(row).toMatchObject({ outcome: 'done', finding: 'closed_in_time' });
		// done means open for 0.5× to 2× the duration + 10 s, by the gateway's own timestamps
		expect(row.closed_at! - row.opened_at!).toBeGreaterThanOrEqual(2_500);
		expect(sim.stats().purgesOpened).toBe(1);
		expect(row.dp_before_bar).toBeGreaterThan(0);
		const after = await waitFor(
			async () => {
				const r = await app.ctx.db
					.selectFrom('purge_commands')
					.selectAll()
					.where('id', '=', view.id)
					.executeTakeFirstOrThrow();
				return r.dp_after_bar !== null ? r : null;
			},
			{ what: 'ΔP after' }
		);
		// the purge flushed sediment: ΔP after is below ΔP before
		expect(after.dp_after_bar!).toBeLessThan(after.dp_before_bar!);
	});

	it('with the stuck-valve fault the purge is missed and purge_missed is raised', async () => {
		const id = vesselId('lakeline-wren');
		const view = await purge().purgeNow(id, chief, 5);
		const row = await decided(view.id);
		expect(row).toMatchObject({ outcome: 'missed', finding: 'not_opened', opened_at: null });
		await app.ctx.services.alarms!.store.idle();
		const alarm = await app.ctx.db
			.selectFrom('alarms')
			.selectAll()
			.where('vessel_id', '=', id)
			.where('type', '=', 'purge_missed')
			.executeTakeFirst();
		expect(alarm).toMatchObject({ active: 1, priority: 'warning' });
		expect(sim.stats().commandsReceived).toBe(2);
	});
});
