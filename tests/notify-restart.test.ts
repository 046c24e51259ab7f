/**
 * Held first messages and escalations survive a restart: they live in the
 * database, not in timers. The first app's notification timer is stopped so
 * the first message is still held when it shuts down; the second app tells it
 * and escalates it; a third app does not escalate it again.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { startApp } from '$lib/server/app';
import type { AppContext } from '$lib/server/context';
import { saveSettings } from '$lib/server/notify/settings';
import { settle, testAppConfig } from './helpers/app';
import { connectGateway } from './helpers/gateway';
import { waitFor } from './helpers/ports';
import { publishSeries, steady } from './helpers/series';

const dir = mkdtempSync(join(tmpdir(), 'aftwater-notify-restart-'));
let ctx: AppContext | undefined;

async function start() {
	const config = await testAppConfig(join(dir, 'aftwater.db'));
	ctx = await startApp(config, { quiet: true });
	return { ctx, mqttPort: config.MQTT_PORT };
}

async function stop() {
	await ctx?.stop();
	ctx = undefined;
}

afterAll(async () => {
	await stop();
	rmSync(dir, { recursive: true, force: true });
});

const kinds = async (c: AppContext, kind: string) =>
	c.db.selectFrom('mail_outbox').selectAll().where('kind', '=', kind).execute();

describe('across restarts', () => {
	it('a held first message is sent, and an escalation sent once', async () => {
		const first = await start();
		const vessel = await first.ctx.db
			.selectFrom('vessels')
			.select('id')
			.where('code', '=', 'corrin-bay')
			.executeTakeFirstOrThrow();
		await saveSettings(first.ctx.db, { userId: null, name: 'chief@demo.test' }, vessel.id, {
			escalation_after_s: 60
		});
		await first.ctx.services.notify!.stop(); // no timer: the first message stays held
		const gw = await connectGateway(first.mqttPort, 'corrin-bay');
		await publishSeries(gw, 'corrin-bay', 'port', Date.now() - 120_000, [
			...steady(0, 5, { flow_lpm: 110 }),
			...steady(6, 26, { flow_lpm: 40 })
		]);
		await settle(first.ctx);
		gw.end(true);
		const held = await first.ctx.db
			.selectFrom('notify_incidents')
			.selectAll()
			.where('type', '=', 'low_flow')
			.execute();
		expect(held.map((i) => i.phase)).toEqual(['pending']);
		expect(await kinds(first.ctx, 'alarm_raised')).toHaveLength(0);
		await stop();

		const second = await start();
		await waitFor(async () => (await kinds(second.ctx, 'alarm_raised')).length === 2, {
			what: 'the held message to be sent after the restart'
		});
		expect((await kinds(second.ctx, 'alarm_raised')).map((m) => m.to_address).sort()).toEqual([
			'chief@demo.test',
			'tech@demo.test'
		]);
		await second.ctx.services.notify!.pass(Date.now() + 120_000); // past the 60 s, unacknowledged
		expect((await kinds(second.ctx, 'alarm_escalated')).map((m) => m.to_address)).toEqual([
			'fleet@demo.test'
		]);
		await stop();

		const third = await start();
		await third.ctx.services.notify!.pass(Date.now() + 3_600_000);
		expect(await kinds(third.ctx, 'alarm_escalated')).toHaveLength(1);
		expect(await kinds(third.ctx, 'alarm_raised')).toHaveLength(2);
	});
});
