/**
 * A flood: the sea suction of corrin-bay clogs and both shafts lose flow and
 * supply pressure at once. Four alarms (low flow and low supply pressure on
 * each shaft; the two low-margin warnings are covered by low flow) are told in
 * one summary per person, escalated in one message, and followed up once when
 * all are acknowledged and once when all are back to normal.
 *
 * Check values: minimum 420 mm × 0.15 L/min/mm = 63 L/min (common practice,
 * DESIGN.md §3); supply limit ρgh + 0.3 bar ≈ 1025 × 9.80665 × 4.2 m = 0.42 bar
 * + 0.3 = 0.72 bar, so 0.30 bar is below it and 2.0 bar well above.
 */
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { settle, startTestApp, type TestApp } from './helpers/app';
import { connectGateway } from './helpers/gateway';
import * as mail from './helpers/mail';
import { publishSeries, steady } from './helpers/series';
import { saveSettings } from '$lib/server/notify/settings';

let app: TestApp;
let gw: MqttClient;
const chiefActor = { userId: null, name: 'chief@demo.test' };

beforeAll(async () => {
	app = await startTestApp();
	gw = await connectGateway(app.mqttPort, 'corrin-bay');
	const vessel = await db()
		.selectFrom('vessels')
		.select('id')
		.where('code', '=', 'corrin-bay')
		.executeTakeFirstOrThrow();
	await saveSettings(db(), chiefActor, vessel.id, { incident_holdoff_s: 0 });
});
afterAll(async () => {
	gw?.end(true);
	await app?.stop();
});

const db = () => app.ctx.db;

const delivered = (to: string) => mail.deliveredMail(app.ctx, to);
const drained = () => mail.outboxDrained(app.ctx);
const until = (to: string, n: number) => mail.waitForMail(app.ctx, to, { n });

describe('a flood of alarms on one vessel', () => {
	const t0 = Date.now() - 300_000;

	it('is told in one summary per person instead of one e-mail each', async () => {
		for (const shaft of ['port', 'stbd']) {
			await publishSeries(gw, 'corrin-bay', shaft, t0, [
				...steady(0, 5, { flow_lpm: 110, supply_bar: 2 }),
				...steady(6, 26, { flow_lpm: 40, supply_bar: 0.3 })
			]);
		}
		await settle(app.ctx);
		const open = await db()
			.selectFrom('alarms')
			.select('type')
			.where('ended_at', 'is', null)
			.execute();
		expect(open.map((a) => a.type).sort()).toEqual([
			'low_flow',
			'low_flow',
			'low_flow_margin',
			'low_flow_margin',
			'low_supply_pressure',
			'low_supply_pressure'
		]);

		const [flood] = await until('chief@demo.test', 1);
		await until('tech@demo.test', 1);
		await app.ctx.services.notify!.pass(Date.now());
		await drained();
		expect(await delivered('chief@demo.test')).toHaveLength(1);
		expect(await delivered('tech@demo.test')).toHaveLength(1);
		expect(flood.kind).toBe('alarm_flood');
		expect(flood.subject).toBe('[ALARM] 4 alerts on Corrin Bay');
		expect(flood.text).toContain('4 alarms');
		expect(flood.text).toContain('ALARM · Corrin Bay · Port shaft · Low flow');
		expect(flood.text).toContain('ALARM · Corrin Bay · Starboard shaft · Low supply pressure');
		expect(flood.text).toContain('Reading: 40.0 L/min, minimum 63.0 L/min');
		expect(flood.text).not.toContain('Low flow margin');
		const [techFlood] = await delivered('tech@demo.test');
		expect(techFlood.kind).toBe('alarm_flood');
		expect(await delivered('fleet@demo.test')).toHaveLength(0);
	});

	it('escalates once for the whole flood, not once per alarm', async () => {
		// judged past the default 300 s escalation time
		await app.ctx.services.notify!.pass(Date.now() + 400_000);
		await drained();
		const fleet = await delivered('fleet@demo.test');
		expect(fleet.map((m) => m.kind)).toEqual(['alarm_escalated']);
		expect(fleet[0].text).toContain('One of several alerts raised together on Corrin Bay.');
		expect(fleet[0].text).toMatch(/- Rhona Quill \(Chief engineer\)/);
	});

	it('follows up once when all are acknowledged and once when all are back to normal', async () => {
		const engine = app.ctx.services.alarms!.engine;
		const told = await db()
			.selectFrom('notify_incidents')
			.innerJoin('alarms', 'alarms.id', 'notify_incidents.current_alarm_id')
			.select('alarms.id')
			.where('notify_incidents.phase', '=', 'told')
			.execute();
		expect(told).toHaveLength(4);
		for (const { id } of told) {
			await engine.act(id, { type: 'acknowledge', at: Date.now() }, chiefActor, null);
		}
		const [flood, ack] = await until('chief@demo.test', 2);
		expect(ack.subject).toBe('Re: [ALARM] 4 alerts on Corrin Bay');
		expect(ack.text).toContain('All 4 alerts below are acknowledged');
		expect(ack.in_reply_to).toBe(flood.message_id);

		for (const shaft of ['port', 'stbd']) {
			await publishSeries(
				gw,
				'corrin-bay',
				shaft,
				t0,
				steady(27, 55, { flow_lpm: 110, supply_bar: 2 })
			);
		}
		await settle(app.ctx);
		const [, , normal] = await until('chief@demo.test', 3);
		await app.ctx.services.notify!.pass(Date.now() + 3_600_000);
		await drained();
		expect(await delivered('chief@demo.test')).toHaveLength(3);
		expect(normal.subject).toBe('Re: [ALARM] 4 alerts on Corrin Bay');
		expect(normal.text).toContain('All 4 alerts below have returned to normal');
		expect(normal.in_reply_to).toBe(ack.message_id);
		expect(normal.references_header).toBe(`${flood.message_id} ${ack.message_id}`);
		expect(new Set((await delivered('chief@demo.test')).map((m) => m.thread_key)).size).toBe(1);
		// the fleet manager, told by the escalation, hears both follow-ups in his thread
		expect((await delivered('fleet@demo.test')).map((m) => m.kind)).toEqual([
			'alarm_escalated',
			'alarm_flood',
			'alarm_flood'
		]);
	});
});
