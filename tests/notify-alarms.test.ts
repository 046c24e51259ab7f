/**
 * Who is told what about one alarm, through the real broker, rules engine,
 * outbox and SMTP sink: the crew at once, the fleet managers when nobody
 * acknowledged in time, one threaded follow-up each for acknowledgement and
 * recovery, and one message per incident from a chattering shaft. Messages are
 * counted at the sink, by recipient and Message-ID.
 *
 * Check values: corrin-bay's port shaft is 420 mm × 0.15 L/min/mm = 63 L/min
 * minimum, hallow-tern's main shaft 600 mm → 90 L/min, skerry-lark's 150 mm →
 * 22.5 L/min (the factor is common practice, DESIGN.md §3). 1 US gal =
 * 3.785411784 L (NIST SP 811, Appendix B): 40 L/min = 10.567 gpm, 63 L/min =
 * 16.643 gpm, shown to one decimal.
 */
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appUser, settle, shaftIds, startTestApp, type TestApp } from './helpers/app';
import { connectGateway } from './helpers/gateway';
import * as mail from './helpers/mail';
import { waitFor } from './helpers/ports';
import { routeEvent } from './helpers/route';
import { publishSeries, steady } from './helpers/series';
import * as settingsApi from '../src/routes/api/vessels/[vesselId=id]/notification-settings/+server';

let app: TestApp;
const gateways = new Map<string, MqttClient>();
const chiefActor = { userId: null, name: 'chief@demo.test' };

beforeAll(async () => {
	app = await startTestApp();
	for (const v of ['corrin-bay', 'hallow-tern', 'skerry-lark']) {
		gateways.set(v, await connectGateway(app.mqttPort, v));
	}
	// the technician reads US customary units: every figure to him in gpm
	await app.ctx.db
		.updateTable('users')
		.set({ units: 'us' })
		.where('email', '=', 'tech@demo.test')
		.execute();
});
afterAll(async () => {
	for (const gw of gateways.values()) gw.end(true);
	await app?.stop();
});

const db = () => app.ctx.db;
const engine = () => app.ctx.services.alarms!.engine;
const notify = () => app.ctx.services.notify!;

const ids = (vessel: string, shaft: string) => shaftIds(app.ctx, vessel, shaft);

/** PUT through the route module, as the chief engineer. */
async function putSettings(vesselId: number, body: unknown) {
	const event = routeEvent({
		method: 'PUT',
		path: `/api/vessels/${vesselId}/notification-settings`,
		params: { vesselId },
		user: await appUser(app.ctx, 'chief@demo.test'),
		json: body
	});
	const res = await settingsApi.PUT(event as never);
	expect(res.status).toBe(200);
}

const delivered = (to: string, kind?: string) => mail.deliveredMail(app.ctx, to, kind);
const outboxDrained = () => mail.outboxDrained(app.ctx);
const waitForMail = (to: string, kind: string, n = 1, match?: (text: string) => boolean) =>
	mail.waitForMail(app.ctx, to, { kind, n, match });

async function openAlarm(shaftId: number) {
	await settle(app.ctx);
	return db()
		.selectFrom('alarms')
		.selectAll()
		.where('shaft_id', '=', shaftId)
		.where('type', '=', 'low_flow')
		.where('ended_at', 'is', null)
		.executeTakeFirstOrThrow();
}

describe('a pump trip on corrin-bay’s port shaft', () => {
	let shaftId: number;
	let vesselId: number;
	const t0 = Date.now() - 300_000; // sample time, all in the past

	beforeAll(async () => {
		({ shaftId, vesselId } = await ids('corrin-bay', 'port'));
		// short escalation; recovery told as soon as the shaft is back
		await putSettings(vesselId, { escalation_after_s: 1, incident_holdoff_s: 0 });
	});

	it('e-mails the chief engineer and the technician, each in their units, and nobody ashore', async () => {
		await publishSeries(gateways.get('corrin-bay')!, 'corrin-bay', 'port', t0, [
			...steady(0, 10, { flow_lpm: 110 }),
			...steady(11, 31, { flow_lpm: 40 }) // 20 s below 63 L/min: past the 15 s on-delay
		]);
		const [chief] = await waitForMail('chief@demo.test', 'alarm_raised');
		const [tech] = await waitForMail('tech@demo.test', 'alarm_raised');
		await outboxDrained();

		expect(chief.subject).toBe('[ALARM] Corrin Bay · Port shaft: Low flow');
		expect(chief.text).toContain('Vessel:     Corrin Bay');
		expect(chief.text).toContain('Shaft:      Port shaft');
		expect(chief.text).toContain('Reading:    40.0 L/min, minimum 63.0 L/min');
		expect(chief.text).toContain(`http://localhost:3000/vessels/${vesselId}/shafts/${shaftId}`);
		expect(chief.text).toContain('Aftwater supplements, and never replaces');
		expect(chief.text).toMatch(/Since: +\d{4}-\d\d-\d\d \d\d:\d\d \(Europe\/Oslo/);
		expect(tech.text).toContain('Reading:    10.6 gpm, minimum 16.6 gpm');

		// one message each: the low-flow margin warning raised with it is not a second one
		expect(await delivered('chief@demo.test')).toHaveLength(1);
		expect(await delivered('tech@demo.test')).toHaveLength(1);
		expect(await delivered('fleet@demo.test', 'alarm_raised')).toHaveLength(0);
		expect(await delivered('shore@demo.test')).toHaveLength(0);
		const margin = await db()
			.selectFrom('alarms')
			.select('id')
			.where('shaft_id', '=', shaftId)
			.where('type', '=', 'low_flow_margin')
			.execute();
		expect(margin).toHaveLength(1); // it was raised, and deliberately not e-mailed
	});

	it('left unacknowledged past the escalation time, e-mails the fleet manager once, with who was told and when', async () => {
		const [esc] = await waitForMail('fleet@demo.test', 'alarm_escalated');
		expect(esc.subject).toMatch(
			/^\[ALARM\] Corrin Bay · Port shaft: Low flow \(unacknowledged for \d+ min\)$/
		);
		expect(esc.text).toContain('Reading:    40.0 L/min, minimum 63.0 L/min');
		expect(esc.text).toMatch(/- Rhona Quill \(Chief engineer\), \d{4}-\d\d-\d\d \d\d:\d\d/);
		expect(esc.text).toMatch(/- Dev Okafor \(Technician\), \d{4}-\d\d-\d\d \d\d:\d\d/);
		expect(esc.in_reply_to).toBeNull();

		// an hour later, still unacknowledged: still one escalation, not one a second
		await notify().pass(Date.now() + 3_600_000);
		await outboxDrained();
		expect(await delivered('fleet@demo.test', 'alarm_escalated')).toHaveLength(1);
	});

	it('acknowledged: one follow-up to everyone told, in their thread', async () => {
		const alarm = await openAlarm(shaftId);
		await engine().act(
			alarm.id,
			{ type: 'acknowledge', at: Date.now() },
			chiefActor,
			'standby pump started'
		);
		for (const to of ['chief@demo.test', 'tech@demo.test', 'fleet@demo.test']) {
			const [ack] = await waitForMail(to, 'alarm_followup');
			expect(ack.subject).toBe('Re: [ALARM] Corrin Bay · Port shaft: Low flow');
			expect(ack.text).toContain('Acknowledged by Rhona Quill');
			expect(ack.text).toContain('standby pump started');
			const [first] = (await delivered(to)).filter((m) => m.kind !== 'alarm_followup');
			expect(ack.in_reply_to).toBe(first.message_id);
			expect(ack.thread_key).toBe(first.thread_key);
		}
	});

	it('recovery sends one threaded follow-up', async () => {
		await publishSeries(
			gateways.get('corrin-bay')!,
			'corrin-bay',
			'port',
			t0,
			steady(32, 60, { flow_lpm: 110 })
		);
		await settle(app.ctx);
		const recovered = (t: string) => t.includes('Returned to normal');
		const [normal] = await waitForMail('chief@demo.test', 'alarm_followup', 1, recovered);
		await waitForMail('tech@demo.test', 'alarm_followup', 1, recovered);
		await notify().pass(Date.now() + 3_600_000); // later passes add nothing
		await outboxDrained();

		const chief = await delivered('chief@demo.test');
		expect(chief.map((m) => m.kind)).toEqual(['alarm_raised', 'alarm_followup', 'alarm_followup']);
		expect(new Set(chief.map((m) => m.message_id)).size).toBe(3);
		expect(new Set(chief.map((m) => m.thread_key)).size).toBe(1);
		const [raised, ack] = chief;
		expect(normal.message_id).toBe(chief[2].message_id);
		expect(normal.subject).toBe('Re: [ALARM] Corrin Bay · Port shaft: Low flow');
		expect(normal.in_reply_to).toBe(ack.message_id);
		expect(normal.references_header).toBe(`${raised.message_id} ${ack.message_id}`);
		expect(normal.text).toContain('Reading:    110.0 L/min, minimum 63.0 L/min'); // the latest reading
		expect((await delivered('tech@demo.test')).filter((m) => recovered(m.text ?? ''))).toHaveLength(
			1
		);
		const fleet = await delivered('fleet@demo.test');
		expect(fleet.map((m) => m.kind)).toEqual([
			'alarm_escalated',
			'alarm_followup',
			'alarm_followup'
		]);
	});
});

describe('acknowledged in time (skerry-lark port, escalation 60 s)', () => {
	it('is not escalated', async () => {
		const { shaftId, vesselId } = await ids('skerry-lark', 'port');
		await putSettings(vesselId, { escalation_after_s: 60 });
		await publishSeries(gateways.get('skerry-lark')!, 'skerry-lark', 'port', Date.now() - 120_000, [
			...steady(0, 5, { flow_lpm: 60 }),
			...steady(6, 26, { flow_lpm: 5 })
		]);
		const [raised] = await waitFor(
			async () => {
				const rows = (await delivered('chief@demo.test', 'alarm_raised')).filter((m) =>
					m.subject?.includes('Skerry Lark')
				);
				return rows.length ? rows : null;
			},
			{ what: 'the raise on Skerry Lark', timeoutMs: 15_000 }
		);
		expect(raised.text).toContain('Reading:    5.0 L/min, minimum 22.5 L/min');
		const alarm = await openAlarm(shaftId);
		await engine().act(alarm.id, { type: 'acknowledge', at: Date.now() }, chiefActor, null);
		await settle(app.ctx);

		// judged two minutes on: past the 60 s, but acknowledged
		await notify().pass(Date.now() + 120_000);
		await outboxDrained();
		const thread = await db()
			.selectFrom('notify_threads')
			.selectAll()
			.where('thread_key', '=', raised.thread_key!)
			.executeTakeFirstOrThrow();
		expect(thread.escalated_at).toBeNull();
		expect(thread.ack_told_at).not.toBeNull();
		const escalations = (await delivered('fleet@demo.test', 'alarm_escalated')).filter((m) =>
			m.subject?.includes('Skerry Lark')
		);
		expect(escalations).toHaveLength(0);
	});
});

describe('a chattering shaft (hallow-tern main, 90 L/min minimum)', () => {
	it('sends one message per incident, however often it trips', async () => {
		const { shaftId, vesselId } = await ids('hallow-tern', 'main');
		const gw = gateways.get('hallow-tern')!;
		const t0 = Date.now() - 600_000;
		// three trips, each acknowledged and recovered: three alarm instances, one incident
		for (let cycle = 0; cycle < 3; cycle++) {
			const base = cycle * 60;
			await publishSeries(gw, 'hallow-tern', 'main', t0, [
				...steady(base, base + 5, { flow_lpm: 150 }),
				...steady(base + 6, base + 26, { flow_lpm: 40 })
			]);
			const alarm = await openAlarm(shaftId);
			await engine().act(alarm.id, { type: 'acknowledge', at: Date.now() }, chiefActor, null);
			await publishSeries(
				gw,
				'hallow-tern',
				'main',
				t0,
				steady(base + 27, base + 55, { flow_lpm: 150 })
			);
			await settle(app.ctx);
		}
		const instances = await db()
			.selectFrom('alarms')
			.select(['id', 'ended_at'])
			.where('shaft_id', '=', shaftId)
			.where('type', '=', 'low_flow')
			.execute();
		expect(instances).toHaveLength(3);
		expect(instances.every((a) => a.ended_at !== null)).toBe(true);

		await waitForMail('tech@demo.test', 'alarm_raised', 1, (t) => t.includes('Hallow Tern'));
		await notify().pass(Date.now()); // whatever was held is decided now
		await outboxDrained();
		const hallow = async () =>
			(await delivered('tech@demo.test')).filter((m) => m.subject?.includes('Hallow Tern'));
		let got = await hallow();
		expect(got.filter((m) => m.kind === 'alarm_raised')).toHaveLength(1);
		expect(got.filter((m) => m.kind === 'alarm_followup').length).toBeLessThanOrEqual(1);
		expect(new Set(got.map((m) => m.thread_key)).size).toBe(1);

		// after the 600 s hold-off without a new trip the incident is over: one "returned to normal"
		await notify().pass(Date.now() + 601_000);
		await outboxDrained();
		got = await hallow();
		expect(got.filter((m) => (m.text ?? '').includes('Returned to normal'))).toHaveLength(1);
		expect(got.filter((m) => m.kind === 'alarm_raised')).toHaveLength(1);

		// a trip after that is a new incident: a new first message, in a new thread
		await publishSeries(gw, 'hallow-tern', 'main', t0, [
			...steady(200, 205, { flow_lpm: 150 }),
			...steady(206, 226, { flow_lpm: 40 })
		]);
		await waitForMail('tech@demo.test', 'alarm_raised', 2, (t) => t.includes('Hallow Tern'));
		got = await hallow();
		const raised = got.filter((m) => m.kind === 'alarm_raised');
		expect(raised).toHaveLength(2);
		expect(raised[0].thread_key).not.toBe(raised[1].thread_key);
		const incidents = await db()
			.selectFrom('notify_incidents')
			.select(['instances'])
			.where('shaft_id', '=', shaftId)
			.where('type', '=', 'low_flow')
			.orderBy('id')
			.execute();
		expect(incidents.map((i) => i.instances)).toEqual([3, 1]);
		void vesselId;
	});
});
