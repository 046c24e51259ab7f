/**
 * Purge commands through the real broker: "purge now" reaching a gateway on its command topic,
 * the gateway's valve reports proving it (or not), the alarms that follow, and a schedule change
 * rebuilding its node-cron job while the app runs.
 *
 * The gateway's reports carry the gateway's own timestamps, which is what the proof judges, so a
 * purge of 5 s is reported open and closed at once with stamps 5 s apart. The proof's waiting
 * times are shortened (setTolerances) so a missing report is decided in seconds; the scheduler's
 * fake clock keeps the demo schedules from firing during the tests.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import cron from 'node-cron';
import type { MqttClient } from 'mqtt';
import { isDue, type PurgeSchedule } from '$lib/purge';
import type { AlarmType } from '$lib/alarms/types';
import { startTestApp, type TestApp } from './helpers/app';
import { connectGateway, PREFIX } from './helpers/gateway';
import { waitFor } from './helpers/ports';

let app: TestApp;
const tech = { userId: null, name: 'tech@demo.test' };
const purge = () => app.ctx.services.purge!;
const MIN = 60_000;

/** A vessel's test gateway: its connection, the commands it received, and its own clock. */
interface TestGateway {
	code: string;
	vesselId: number;
	client: MqttClient;
	received: { id: string; action: string; duration_s: number; at: number }[];
	/** ahead of every report sent, so each new report is the newest */
	clock: number;
}
const gateways = new Map<string, TestGateway>();
const gateway = (code: string) => gateways.get(code)!;

/** The next gateway timestamp: now (+ aheadMs), and never before the previous one. */
function stamp(g: TestGateway, aheadMs = 0) {
	g.clock = Math.max(g.clock + 1, Date.now() + aheadMs);
	return g.clock;
}

async function report(
	g: TestGateway,
	body: { dp_bar?: number; purge_valve?: 'open' | 'closed' },
	ts: number
) {
	g.clock = Math.max(g.clock, ts);
	await g.client.publishAsync(
		`${PREFIX}/${g.code}/separator/state`,
		JSON.stringify({ ts, ...body }),
		{ qos: 1 }
	);
}

async function command(id: string) {
	return app.ctx.db
		.selectFrom('purge_commands')
		.selectAll()
		.where('id', '=', id)
		.executeTakeFirstOrThrow();
}

async function decided(id: string) {
	return waitFor(
		async () => {
			const row = await command(id);
			return row.outcome === 'pending' ? null : row;
		},
		{ what: `command ${id} decided` }
	);
}

async function separatorAlarm(vesselId: number, type: AlarmType) {
	await app.ctx.services.alarms!.store.idle();
	return app.ctx.db
		.selectFrom('alarms')
		.selectAll()
		.where('vessel_id', '=', vesselId)
		.where('shaft_id', 'is', null)
		.where('type', '=', type)
		.orderBy('id', 'desc')
		.executeTakeFirst();
}

/** A minute at which none of the live jobs is due, for the scheduler's fake clock. */
function quietMinute(): number {
	const jobs = purge().scheduler.jobs();
	for (let t = Date.parse('2031-01-06T00:00:30Z'); ; t += MIN) {
		if (!jobs.some((j) => isDue(j.schedule, j.timeZone, t))) return t;
	}
}

beforeAll(async () => {
	app = await startTestApp();
	purge().scheduler.clock = () => quietMinute();
	purge().setTolerances({ open_within_s: 2, report_lag_s: 1, max_open_extra_s: 0 });
	for (const code of ['corrin-bay', 'hallow-tern']) {
		const client = await connectGateway(app.mqttPort, code);
		const g: TestGateway = {
			code,
			vesselId: app.ctx.services.telemetry!.registry.vessel(code)!.id,
			client,
			received: [],
			clock: 0
		};
		const topic = `${PREFIX}/${code}/separator/command`;
		await client.subscribeAsync(topic, { qos: 1 });
		client.on('message', (t, payload) => {
			if (t === topic) g.received.push({ ...JSON.parse(payload.toString()), at: Date.now() });
		});
		gateways.set(code, g);
	}
});
afterAll(async () => {
	for (const g of gateways.values()) g.client.end(true);
	await app?.stop();
});

describe('purge now', () => {
	it('reaches the gateway on its command topic within a second, recorded with who asked', async () => {
		const g = gateway('corrin-bay');
		const before = g.received.length;
		// the deadline runs from before the request, so it covers recording and publishing
		const arrival = waitFor(() => g.received[before], {
			timeoutMs: 1_000,
			intervalMs: 5,
			what: 'the command'
		});
		const view = await purge().purgeNow(g.vesselId, tech, 5);
		const msg = await arrival;
		expect(Object.keys(msg).sort()).toEqual(['action', 'at', 'duration_s', 'id']);
		expect(msg).toMatchObject({ id: view.id, action: 'purge', duration_s: 5 });
		expect(view.id).toMatch(/^[0-9a-f-]{36}$/);
		expect(await command(view.id)).toMatchObject({
			vessel_id: g.vesselId,
			requested_by: 'tech@demo.test',
			source: 'manual',
			duration_s: 5,
			outcome: 'pending'
		});
	});

	it('refuses a second purge while one is under way (409)', async () => {
		await expect(purge().purgeNow(gateway('corrin-bay').vesselId, tech, 5)).rejects.toMatchObject({
			status: 409,
			code: 'purge_in_progress'
		});
	});

	it('no valve report (a stuck valve): the command is missed and purge_missed is raised', async () => {
		const g = gateway('corrin-bay');
		const id = g.received[g.received.length - 1].id;
		expect(purge().verifier.pendingIds()).toEqual([id]);
		const row = await decided(id);
		expect(row).toMatchObject({ outcome: 'missed', finding: 'not_opened', opened_at: null });
		expect(row.decided_at).not.toBeNull();
		expect(await separatorAlarm(g.vesselId, 'purge_missed')).toMatchObject({
			active: 1,
			priority: 'warning',
			ended_at: null
		});
	});

	it('the valve report closes the next command as done, records ΔP before it and clears purge_missed', async () => {
		const g = gateway('corrin-bay');
		for (const dp of [0.62, 0.64, 0.63])
			await report(g, { dp_bar: dp, purge_valve: 'closed' }, stamp(g));
		await app.ctx.services.telemetry!.pipeline.drain();
		const view = await purge().purgeNow(g.vesselId, tech, 5);
		await waitFor(() => g.received.find((m) => m.id === view.id), { what: 'the command' });
		const opened = stamp(g, 100);
		await report(g, { dp_bar: 0.63, purge_valve: 'open' }, opened);
		await report(g, { dp_bar: 0.31, purge_valve: 'closed' }, opened + 5_000);
		const row = await decided(view.id);
		expect(row).toMatchObject({
			outcome: 'done',
			finding: 'closed_in_time',
			opened_at: opened,
			closed_at: opened + 5_000
		});
		// median of the readings in the minute before opening: 0.62, 0.64, 0.63 → 0.63
		expect(row.dp_before_bar).toBeCloseTo(0.63, 9);
		const alarm = await separatorAlarm(g.vesselId, 'purge_missed');
		expect(alarm).toMatchObject({ active: 0 });
		expect(alarm!.cleared_at).not.toBeNull();
	});

	it('a valve that stays open too long raises purge_valve_stuck_open; closing clears it', async () => {
		const g = gateway('hallow-tern');
		const view = await purge().purgeNow(g.vesselId, tech, 5);
		await waitFor(() => g.received.find((m) => m.id === view.id), { what: 'the command' });
		const opened = stamp(g, 100);
		await report(g, { purge_valve: 'open' }, opened);
		// still open 11 s later, past 2 × 5 s + 0 s: decided at once, not after a wait
		await report(g, { purge_valve: 'open' }, opened + 11_000);
		const row = await decided(view.id);
		expect(row).toMatchObject({
			outcome: 'valve_stuck_open',
			finding: 'open_too_long',
			opened_at: opened,
			closed_at: null
		});
		expect(await separatorAlarm(g.vesselId, 'purge_valve_stuck_open')).toMatchObject({
			active: 1,
			limit_value: 10
		});
		expect(await separatorAlarm(g.vesselId, 'purge_missed')).toBeUndefined();
		// while it reports open, no purge can start: purge now is refused, a scheduled run is recorded as not sent
		await expect(purge().purgeNow(g.vesselId, tech, 5)).rejects.toMatchObject({
			status: 409,
			code: 'valve_open'
		});
		const due = Date.parse('2031-01-07T02:05:10Z'); // 10:05 in Singapore (UTC+8): every 15 min from :05
		expect(isDue(purge().scheduler.job(g.vesselId)!.schedule, 'Asia/Singapore', due)).toBe(true);
		const sent = g.received.length;
		purge().scheduler.clock = () => due;
		await purge().scheduler.runNow(g.vesselId);
		purge().scheduler.clock = () => quietMinute();
		const skipped = await app.ctx.db
			.selectFrom('purge_commands')
			.selectAll()
			.where('vessel_id', '=', g.vesselId)
			.where('source', '=', 'schedule')
			.executeTakeFirstOrThrow();
		expect(skipped).toMatchObject({
			outcome: 'missed',
			finding: 'valve_already_open',
			requested_by: 'schedule'
		});
		expect(g.received.length).toBe(sent);

		await report(g, { purge_valve: 'closed' }, opened + 12_000);
		await waitFor(
			async () => (await separatorAlarm(g.vesselId, 'purge_valve_stuck_open'))?.active === 0,
			{
				what: 'the alarm to clear'
			}
		);
	});

	it('answers 422 for a duration outside 5–600 s', async () => {
		const { vesselId } = gateway('corrin-bay');
		await expect(purge().purgeNow(vesselId, tech, 4)).rejects.toMatchObject({ status: 422 });
		await expect(purge().purgeNow(vesselId, tech, 601)).rejects.toMatchObject({ status: 422 });
	});
});

describe('schedule change', () => {
	const everyQuarter: PurgeSchedule = {
		enabled: true,
		interval_min: 15,
		duration_s: 5,
		offset_min: 7,
		quiet_hours: []
	};
	const purgeTasks = () =>
		[...cron.getTasks().values()].filter((t) => t.name?.startsWith('purge:'));

	it('rebuilds the vessel’s node-cron job at once, without duplicates, and the new job runs the new schedule', async () => {
		const g = gateway('corrin-bay');
		const old = purge().scheduler.job(g.vesselId)!;
		expect(old.schedule).toMatchObject({ interval_min: 16, offset_min: 2 }); // the demo seed
		const tasksBefore = purgeTasks().length;
		expect(tasksBefore).toBe(purge().scheduler.jobs().length);

		const result = await purge().setSchedule(
			g.vesselId,
			{ ...everyQuarter, reason: 'more silt at this berth' },
			tech
		);
		expect(result.changed).toBe(true);
		const job = purge().scheduler.job(g.vesselId)!;
		expect(job.schedule).toMatchObject({ interval_min: 15, offset_min: 7, duration_s: 5 });
		expect(job.taskId).not.toBe(old.taskId);
		expect(cron.getTask(old.taskId)).toBeUndefined(); // the old task is destroyed, not just stopped
		expect(purgeTasks().filter((t) => t.name === 'purge:corrin-bay')).toHaveLength(1);
		expect(purgeTasks()).toHaveLength(tasksBefore);

		// Oslo in January is UTC+1. 10:07 local = 607 min = 7 + 15 × 40, but 2 + 16 × 37 = 594 ≠ 607:
		// due only in the new schedule. 00:02 local is the old schedule's first run, before the new one's 00:07.
		const newRun = Date.parse('2031-01-07T09:07:10Z');
		const oldRun = Date.parse('2031-01-06T23:02:10Z');
		expect([
			isDue(old.schedule, 'Europe/Oslo', newRun),
			isDue(job.schedule, 'Europe/Oslo', newRun)
		]).toEqual([false, true]);
		expect([
			isDue(old.schedule, 'Europe/Oslo', oldRun),
			isDue(job.schedule, 'Europe/Oslo', oldRun)
		]).toEqual([true, false]);

		const before = g.received.length;
		purge().scheduler.clock = () => newRun;
		await purge().scheduler.runNow(g.vesselId);
		const msg = await waitFor(() => g.received[before], { what: 'the scheduled command' });
		expect(msg).toMatchObject({ action: 'purge', duration_s: 5 });
		expect(await command(msg.id)).toMatchObject({
			source: 'schedule',
			requested_by: 'schedule',
			user_id: null
		});
		await decided(msg.id); // no report: missed, which frees the vessel for the next run
		// once per minute, however often the minute ticks
		await purge().scheduler.runNow(g.vesselId);
		await purge().verifier.idle();
		expect(g.received.length).toBe(before + 1);

		purge().scheduler.clock = () => oldRun;
		await purge().scheduler.runNow(g.vesselId);
		await purge().verifier.idle();
		expect(g.received.length).toBe(before + 1);
		purge().scheduler.clock = () => quietMinute();
	});

	it('is audited with the old and new values and the reason', async () => {
		const row = await app.ctx.db
			.selectFrom('audit_log')
			.selectAll()
			.where('action', '=', 'purge.schedule.update')
			.where('vessel_id', '=', gateway('corrin-bay').vesselId)
			.orderBy('id', 'desc')
			.executeTakeFirstOrThrow();
		expect(row.actor).toBe('tech@demo.test');
		expect(JSON.parse(row.details!)).toMatchObject({
			reason: 'more silt at this berth',
			before: { interval_min: 16, offset_min: 2, duration_s: 20 },
			after: everyQuarter,
			changes: {
				interval_min: { from: 16, to: 15 },
				offset_min: { from: 2, to: 7 },
				duration_s: { from: 20, to: 5 }
			}
		});
	});

	it('pausing removes the job and its task; enabling builds one again', async () => {
		const { vesselId } = gateway('corrin-bay');
		await purge().setSchedule(
			vesselId,
			{ ...everyQuarter, enabled: false, reason: 'in port' },
			tech
		);
		expect(purge().scheduler.job(vesselId)).toBeUndefined();
		expect(purgeTasks().filter((t) => t.name === 'purge:corrin-bay')).toHaveLength(0);
		await purge().setSchedule(vesselId, { ...everyQuarter, reason: 'at sea again' }, tech);
		expect(purgeTasks().filter((t) => t.name === 'purge:corrin-bay')).toHaveLength(1);
		expect(
			purge()
				.scheduler.jobs()
				.filter((j) => j.vesselId === vesselId)
		).toHaveLength(1);
	});
});
