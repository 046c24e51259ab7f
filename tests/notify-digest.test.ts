/**
 * The daily digest, called with a fixed clock (the cron only decides when to
 * call it): per vessel, the alerts of the day before, time below minimum per
 * shaft from rollup_1m, purges done and missed; at the user's hour in the
 * right zone; once per local day; delivered through the SMTP sink.
 *
 * Check values: Europe/Oslo is UTC+01:00 on 2026-03-10 (before the EU change
 * to summer time on the last Sunday of March, 2026-03-29), so 07:00 there is
 * 06:00 UTC; Asia/Singapore is UTC+08:00 all year, so 06:00 there is 22:00
 * UTC the day before (IANA tz database). Minimum 420 mm × 0.15 L/min/mm =
 * 63 L/min (common practice, DESIGN.md §3). Ten 1-minute buckets with 30 s
 * below each = 5 min below; 24 h − 10 min covered = 23 h 50 min without data.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appUser, startTestApp, type TestApp } from './helpers/app';
import { deliveredMail } from './helpers/mail';
import { waitFor } from './helpers/ports';
import * as users from '$lib/server/users/repository';
import { savePreferences } from '$lib/server/mail/preferences';

let app: TestApp;
const db = () => app.ctx.db;
const notify = () => app.ctx.services.notify!;

const H = 3_600_000;
const MIN = 60_000;
/** 2026-03-10 07:00 Europe/Oslo */
const OSLO_0700 = Date.UTC(2026, 2, 10, 6, 0);
const DAY_BEFORE = OSLO_0700 - 24 * H;

let corrin: { id: number; port: number; stbd: number };
let hallow: { id: number; main: number };

async function vessel(code: string) {
	const v = await db()
		.selectFrom('vessels')
		.select('id')
		.where('code', '=', code)
		.executeTakeFirstOrThrow();
	const shafts = await db()
		.selectFrom('shafts')
		.select(['id', 'code'])
		.where('vessel_id', '=', v.id)
		.execute();
	return { id: v.id, shafts: Object.fromEntries(shafts.map((s) => [s.code, s.id])) };
}

async function alarm(values: {
	vessel_id: number;
	shaft_id: number | null;
	type: 'low_flow' | 'purge_missed';
	priority: 'alarm' | 'warning';
	raised_at: number;
	ended_at: number | null;
	events: { at: number; event: string; actor?: string; user_id?: string | null }[];
}) {
	const { events, ...row } = values;
	const { id } = await db()
		.insertInto('alarms')
		.values({
			...row,
			state: row.ended_at ? 'normal' : 'unacknowledged',
			active: row.ended_at ? 0 : 1,
			acknowledged: row.ended_at ? 1 : 0,
			shelved_until: null,
			suppressed: 0,
			out_of_service: 0,
			value: null,
			limit_value: null,
			last_value: null,
			cleared_at: null,
			acknowledged_at: null,
			acknowledged_by: null,
			updated_at: row.raised_at
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	for (const e of events) {
		await db()
			.insertInto('alarm_events')
			.values({
				alarm_id: id,
				at: e.at,
				event: e.event,
				from_state: null,
				to_state: 'normal',
				user_id: e.user_id ?? null,
				actor: e.actor ?? 'system',
				value: null,
				comment: null
			})
			.execute();
	}
}

async function purge(vesselId: number, at: number, outcome: 'done' | 'missed') {
	await db()
		.insertInto('purge_commands')
		.values({
			id: `test-${vesselId}-${at}`,
			vessel_id: vesselId,
			requested_at: at,
			requested_by: 'schedule',
			user_id: null,
			source: 'schedule',
			duration_s: 10,
			outcome,
			finding: null,
			opened_at: null,
			closed_at: null,
			decided_at: null,
			dp_before_bar: null,
			dp_after_bar: null
		})
		.execute();
}

const user = (email: string) => appUser(app.ctx, email);
const deliveredDigest = (to: string) => deliveredMail(app.ctx, to, 'daily_digest');

beforeAll(async () => {
	app = await startTestApp();
	const c = await vessel('corrin-bay');
	corrin = { id: c.id, port: c.shafts.port, stbd: c.shafts.stbd };
	const h = await vessel('hallow-tern');
	hallow = { id: h.id, main: h.shafts.main };
	const chief = await user('chief@demo.test');

	// the period's low-flow alarm, acknowledged and cleared; a missed purge still open at its end
	await alarm({
		vessel_id: corrin.id,
		shaft_id: corrin.port,
		type: 'low_flow',
		priority: 'alarm',
		raised_at: DAY_BEFORE + 4 * H,
		ended_at: DAY_BEFORE + 4 * H + 5 * MIN,
		events: [
			{ at: DAY_BEFORE + 4 * H, event: 'raise' },
			{
				at: DAY_BEFORE + 4 * H + 2 * MIN,
				event: 'acknowledge',
				actor: chief.email,
				user_id: chief.id
			},
			{ at: DAY_BEFORE + 4 * H + 5 * MIN, event: 'clear' }
		]
	});
	await alarm({
		vessel_id: corrin.id,
		shaft_id: null,
		type: 'purge_missed',
		priority: 'warning',
		raised_at: OSLO_0700 - 3 * H,
		ended_at: null,
		events: [{ at: OSLO_0700 - 3 * H, event: 'raise' }]
	});
	// before the period: not in it
	await alarm({
		vessel_id: corrin.id,
		shaft_id: corrin.stbd,
		type: 'low_flow',
		priority: 'alarm',
		raised_at: DAY_BEFORE - 5 * H,
		ended_at: DAY_BEFORE - 4 * H,
		events: [{ at: DAY_BEFORE - 5 * H, event: 'raise' }]
	});
	for (let m = 0; m < 10; m++) {
		await db()
			.insertInto('rollup_1m')
			.values({
				shaft_id: corrin.port,
				bucket: DAY_BEFORE + 4 * H + m * MIN,
				n: 60,
				flow_min: m === 3 ? 41 : 55,
				flow_min_at: null,
				flow_max: 70,
				flow_sum: 3300,
				supply_n: 0,
				supply_min: null,
				supply_max: null,
				supply_sum: 0,
				temp_n: 0,
				temp_min: null,
				temp_max: null,
				temp_sum: 0,
				rpm_n: 0,
				rpm_min: null,
				rpm_max: null,
				rpm_sum: 0,
				covered_ms: 60_000,
				below_ms: 30_000
			})
			.execute();
	}
	for (const at of [DAY_BEFORE + 1 * H, DAY_BEFORE + 9 * H, DAY_BEFORE + 17 * H])
		await purge(corrin.id, at, 'done');
	await purge(corrin.id, DAY_BEFORE + 14 * H, 'missed');
	await purge(corrin.id, DAY_BEFORE - 2 * H, 'done'); // the day before: not counted

	// two vessels: the hour is read in the chief's own zone
	await savePreferences(app.ctx, { userId: chief.id, name: chief.email }, chief, {
		digest_hour: 7,
		time_zone: 'Europe/Oslo'
	});
	// one vessel: the ship's clock (Asia/Singapore), whatever the zone saved
	const soloId = await users.create(db(), {
		email: 'solo@demo.test',
		name: 'Ansel Brook',
		role: 'technician',
		passwordHash: null,
		vesselIds: [hallow.id]
	});
	await savePreferences(
		app.ctx,
		{ userId: soloId, name: 'solo@demo.test' },
		{ id: soloId, role: 'technician' },
		{
			digest_hour: 6,
			time_zone: 'UTC'
		}
	);
});
afterAll(async () => {
	await app?.stop();
});

describe('the daily digest', () => {
	it('tells the chief engineer the day of his vessels at 07:00 his time', async () => {
		const sent = await notify().digests(OSLO_0700 + 60_000);
		expect(sent.map((s) => s.email)).toEqual(['chief@demo.test']);
		const [digest] = await waitFor(async () => {
			const rows = await deliveredDigest('chief@demo.test');
			return rows.length ? rows : null;
		});
		expect(digest.subject).toBe(
			'Aftwater daily digest 2026-03-10: 2 alerts, 5 min below minimum flow, 1 missed purge'
		);
		const text = digest.text!;
		expect(text).toContain('From 2026-03-09 07:00 (Europe/Oslo, UTC+01:00) = 2026-03-09 06:00 UTC');
		expect(text).toContain('== Corrin Bay ==');
		expect(text).toContain('== Skerry Lark ==');
		expect(text).not.toContain('Hallow Tern');
		expect(text).toContain(
			'ALARM · Port shaft · Low flow · raised 2026-03-09 11:00 (Europe/Oslo, UTC+01:00) = 2026-03-09 10:00 UTC · cleared 2026-03-09 11:05'
		);
		expect(text).toContain('acknowledged by Rhona Quill 2026-03-09 11:02');
		expect(text).toContain('WARNING · whole vessel · Purge missed');
		expect(text).toContain('still active · not acknowledged');
		expect(text).not.toContain('Starboard shaft · Low flow'); // ended before the period: left out
		expect(text).toContain(
			'- Port shaft (minimum 63.0 L/min): 5 min below, lowest 41.0 L/min, 23 h 50 min without data'
		);
		expect(text).toContain(
			'- Starboard shaft (minimum 63.0 L/min): 0 min below, lowest —, 1 d 0 h without data'
		);
		expect(text).toContain('Purges: 3 done, 1 missed:\n- 2026-03-09 21:00 (Europe/Oslo');
		expect(text).toContain(`http://localhost:3000/vessels/${corrin.id}/shafts/${corrin.port}`);
		expect(text).toContain('Aftwater supplements, and never replaces');
	});

	it('is sent once a day: a second tick in the hour, or a later hour, sends nothing', async () => {
		expect(await notify().digests(OSLO_0700 + 15 * MIN)).toEqual([]);
		expect(await notify().digests(OSLO_0700 + 2 * H)).toEqual([]);
		expect(await notify().digests(OSLO_0700 - 15 * MIN)).toEqual([]);
		expect(await deliveredDigest('chief@demo.test')).toHaveLength(1);
	});

	it('reads a one-vessel crew member’s hour on the ship’s clock', async () => {
		// 06:00 in Singapore is 22:00 UTC the day before; at 06:00 UTC nothing is due for him
		const singapore0600 = Date.UTC(2026, 2, 9, 22, 0);
		expect(await notify().digests(Date.UTC(2026, 2, 10, 6, 0))).toEqual([]);
		const sent = await notify().digests(singapore0600 + 30_000);
		expect(sent.map((s) => [s.email, s.localDate])).toEqual([['solo@demo.test', '2026-03-10']]);
		const [digest] = await waitFor(async () => {
			const rows = await deliveredDigest('solo@demo.test');
			return rows.length ? rows : null;
		});
		expect(digest.text).toContain('== Hallow Tern ==');
		expect(digest.text).not.toContain('Corrin Bay');
		expect(digest.text).toContain('(Asia/Singapore, UTC+08:00)');
	});
});
