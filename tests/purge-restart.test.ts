/**
 * Commands left pending when the server stopped are judged again at start-up from the stored
 * valve events: a purge that happened is proved, one that did not is missed and alarmed, and one
 * still inside its window keeps waiting for the gateway's reports. The node-cron jobs are built
 * again from the database, one per enabled schedule.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import Database from 'better-sqlite3';
import cron from 'node-cron';
import type { MqttClient } from 'mqtt';
import { startApp } from '$lib/server/app';
import type { AppContext } from '$lib/server/context';
import { startTestApp, testAppConfig } from './helpers/app';
import { connectGateway, PREFIX } from './helpers/gateway';
import { waitFor } from './helpers/ports';

let ctx: AppContext;
let dir: string;
let gw: MqttClient | undefined;
const ids: Record<string, number> = {};
const now = Date.now();

/** A row as a command recorded by the previous run, still pending. */
function pending(id: string, vesselId: number, requestedAt: number) {
	return {
		id,
		vessel_id: vesselId,
		requested_at: requestedAt,
		requested_by: 'schedule',
		user_id: null,
		source: 'schedule',
		duration_s: 20,
		outcome: 'pending'
	};
}

beforeAll(async () => {
	const first = await startTestApp();
	dir = first.dir;
	for (const v of await first.ctx.db.selectFrom('vessels').select(['id', 'code']).execute())
		ids[v.code] = v.id;
	await first.ctx.stop(); // the folder stays: the next run opens the same file

	// What the previous run left behind when it stopped: three pending commands.
	const sqlite = new Database(first.dbPath);
	const insert = sqlite.prepare(
		`insert into purge_commands (id, vessel_id, requested_at, requested_by, user_id, source, duration_s, outcome)
		 values (@id, @vessel_id, @requested_at, @requested_by, @user_id, @source, @duration_s, @outcome)`
	);
	// corrin-bay: purged while the server was stopping; the writer had stored the valve event
	const sent = now - 120_000;
	insert.run(pending('c-done', ids['corrin-bay'], sent));
	sqlite
		.prepare(
			'insert into valve_events (vessel_id, opened_at, closed_at, dp_before_bar) values (?, ?, ?, ?)'
		)
		.run(ids['corrin-bay'], sent + 3_000, sent + 24_000, 0.7);
	const states = sqlite.prepare(
		'insert into separator_states (vessel_id, ts, dp_bar, purge_valve) values (?, ?, ?, ?)'
	);
	for (const [s, dp] of [
		[-40, 0.69],
		[-20, 0.71],
		[-5, 0.7]
	])
		states.run(ids['corrin-bay'], sent + 3_000 + s * 1000, dp, 'closed');
	// lakeline-wren: no valve event at all, long past its window
	insert.run(pending('l-missed', ids['lakeline-wren'], now - 600_000));
	// hallow-tern: sent just now; its reports are still to come
	insert.run(pending('h-waiting', ids['hallow-tern'], now));
	sqlite.close();

	const config = await testAppConfig(first.dbPath);
	ctx = await startApp(config, { quiet: true });
	await ctx.services.purge!.verifier.idle();
	gw = await connectGateway(config.MQTT_PORT, 'hallow-tern');
});
afterAll(async () => {
	gw?.end(true);
	await ctx?.stop();
	if (dir) rmSync(dir, { recursive: true, force: true });
});

const row = (id: string) =>
	ctx.db.selectFrom('purge_commands').selectAll().where('id', '=', id).executeTakeFirstOrThrow();

describe('after a restart', () => {
	it('a pending command whose valve event was stored is proved done from it', async () => {
		expect(await row('c-done')).toMatchObject({
			outcome: 'done',
			finding: 'closed_in_time',
			opened_at: now - 117_000,
			closed_at: now - 96_000
		});
		// median of 0.69, 0.71, 0.70 in the minute before opening
		expect((await row('c-done')).dp_before_bar).toBeCloseTo(0.7, 9);
	});

	it('a pending command with no valve event is missed, and purge_missed is raised', async () => {
		expect(await row('l-missed')).toMatchObject({ outcome: 'missed', finding: 'not_opened' });
		await ctx.services.alarms!.store.idle();
		const alarm = await ctx.db
			.selectFrom('alarms')
			.selectAll()
			.where('vessel_id', '=', ids['lakeline-wren'])
			.where('type', '=', 'purge_missed')
			.executeTakeFirst();
		expect(alarm).toMatchObject({ active: 1, shaft_id: null });
	});

	it('a command still inside its window waits, and the gateway’s reports then prove it', async () => {
		expect((await row('h-waiting')).outcome).toBe('pending');
		expect(ctx.services.purge!.verifier.pendingIds()).toContain('h-waiting');
		const topic = `${PREFIX}/hallow-tern/separator/state`;
		await gw!.publishAsync(topic, JSON.stringify({ ts: now + 2_000, purge_valve: 'open' }), {
			qos: 1
		});
		await gw!.publishAsync(topic, JSON.stringify({ ts: now + 22_000, purge_valve: 'closed' }), {
			qos: 1
		});
		await waitFor(async () => (await row('h-waiting')).outcome === 'done', { what: 'the outcome' });
	});

	it('builds one node-cron job per enabled schedule again', () => {
		const jobs = ctx.services.purge!.scheduler.jobs();
		expect(jobs.map((j) => j.vesselCode).sort()).toEqual([
			'corrin-bay',
			'hallow-tern',
			'lakeline-wren',
			'skerry-lark'
		]);
		const tasks = [...cron.getTasks().values()].filter((t) => t.name?.startsWith('purge:'));
		expect(tasks.map((t) => t.id).sort()).toEqual(jobs.map((j) => j.taskId).sort());
	});
});
