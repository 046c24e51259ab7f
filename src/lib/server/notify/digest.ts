/**
 * The daily digest: for each user who chose an hour, at that hour, the day
 * before it — per vessel, the alerts of the period (every priority: a digest
 * is the record, not an interruption), the time each shaft ran below its
 * minimum and without data (from rollup_1m), and the purges done and missed.
 *
 * Whose vessels: a crew member's own; the whole fleet for fleet managers,
 * shore office and admins. Which clock: see digestZone() in policy.ts. One
 * digest per user and local date (notify_digests), so a second tick, a
 * restart or two servers never send it twice; a quiet period delays it.
 */
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import { enqueueMail, mailEnv } from '../mail/outbox';
import { deliverableAt, getPreferences } from '../mail/preferences';
import { renderMail } from '../mail/templates';
import type { DailyDigestData, DigestAlarm, DigestVessel } from '../mail/templates/types';
import { minimumFlow } from '$lib/flow';
import { maybeContext } from '../context';
import { CONDITION_OF, digestSlot, digestZone, inCrewAudience } from './policy';

type Db = Kysely<Database>;

/** The digest data of a user's vessels over a period. */
export async function buildDigestVessels(
	db: Db,
	vesselIds: number[],
	period: { from: number; to: number }
): Promise<DigestVessel[]> {
	if (!vesselIds.length) return [];
	const { from, to } = period;
	const vessels = await db
		.selectFrom('vessels')
		.select(['id', 'name', 'time_zone'])
		.where('id', 'in', vesselIds)
		.orderBy('name')
		.execute();
	const out: DigestVessel[] = [];
	for (const v of vessels) {
		const shafts = await db
			.selectFrom('shafts')
			.select(['id', 'name', 'diameter_mm', 'min_flow_factor_lpm_per_mm', 'position', 'code'])
			.where('vessel_id', '=', v.id)
			.execute();
		const names = new Map(shafts.map((s) => [s.id, s.name]));
		out.push({
			vessel: { id: v.id, name: v.name, timeZone: v.time_zone },
			alarms: await digestAlarms(db, v.id, names, from, to),
			shafts: await Promise.all(
				shafts
					.sort((a, b) => order(a.position) - order(b.position) || a.code.localeCompare(b.code))
					.map(async (s) => {
						const r = await db
							.selectFrom('rollup_1m')
							.select((eb) => [
								eb.fn.coalesce(eb.fn.sum<number>('below_ms'), eb.lit(0)).as('below'),
								eb.fn.coalesce(eb.fn.sum<number>('covered_ms'), eb.lit(0)).as('covered'),
								eb.fn.min('flow_min').as('lowest')
							])
							.where('shaft_id', '=', s.id)
							.where('bucket', '>=', from)
							.where('bucket', '<', to)
							.executeTakeFirst();
						const covered = Number(r?.covered ?? 0);
						return {
							shaft: { id: s.id, name: s.name },
							minFlowLpm: minimumFlow(s.diameter_mm, s.min_flow_factor_lpm_per_mm),
							belowMinimumMs: Number(r?.below ?? 0),
							// gaps are unknown, never compliant
							unknownMs: Math.max(0, to - from - covered),
							lowestFlowLpm: r?.lowest === null || r?.lowest === undefined ? null : Number(r.lowest)
						};
					})
			),
			purges: await digestPurges(db, v.id, from, to)
		});
	}
	return out;
}

const order = (p: string) => ({ port: 0, centre: 1, starboard: 2 })[p] ?? 3;

/** Alerts that were open at any time in the period, as they stood at its end. */
async function digestAlarms(
	db: Db,
	vesselId: number,
	shaftNames: Map<number, string>,
	from: number,
	to: number
): Promise<DigestAlarm[]> {
	const alarms = await db
		.selectFrom('alarms')
		.select(['id', 'shaft_id', 'type', 'priority', 'raised_at'])
		.where('vessel_id', '=', vesselId)
		.where('raised_at', '<', to)
		.where((eb) => eb.or([eb('ended_at', 'is', null), eb('ended_at', '>=', from)]))
		.orderBy('raised_at')
		.execute();
	if (!alarms.length) return [];
	const events = await db
		.selectFrom('alarm_events')
		.leftJoin('users', 'users.id', 'alarm_events.user_id')
		.select([
			'alarm_events.alarm_id',
			'alarm_events.at',
			'alarm_events.event',
			'alarm_events.actor',
			'users.name'
		])
		.where(
			'alarm_events.alarm_id',
			'in',
			alarms.map((a) => a.id)
		)
		.where('alarm_events.at', '<=', to)
		.orderBy('alarm_events.at')
		.orderBy('alarm_events.id')
		.execute();
	const byEmail = new Map(
		(await db.selectFrom('users').select(['email', 'name']).execute()).map((u) => [u.email, u.name])
	);
	return alarms.map((a) => {
		// replay its events up to the period's end: active or cleared then, and by whom acknowledged
		let active = false;
		let clearedAt: number | null = null;
		let ackBy: string | null = null;
		let ackAt: number | null = null;
		for (const e of events.filter((x) => x.alarm_id === a.id)) {
			if (e.event === 'raise' || e.event === 'activate') {
				active = true;
				clearedAt = null;
			} else if (e.event === 'clear') {
				active = false;
				clearedAt = e.at;
			} else if (e.event === 'acknowledge') {
				ackBy = e.name ?? byEmail.get(e.actor) ?? e.actor;
				ackAt = e.at;
			}
		}
		return {
			alarmId: a.id,
			priority: a.priority,
			condition: CONDITION_OF[a.type],
			shaft:
				a.shaft_id === null ? null : { id: a.shaft_id, name: shaftNames.get(a.shaft_id) ?? '' },
			raisedAt: a.raised_at,
			clearedAt: active ? null : clearedAt,
			acknowledgedBy: ackBy,
			acknowledgedAt: ackAt
		};
	});
}

/** Scheduled and manual purges of the period by outcome; one stuck open still purged. */
async function digestPurges(db: Db, vesselId: number, from: number, to: number) {
	const rows = await db
		.selectFrom('purge_commands')
		.select(['requested_at', 'outcome'])
		.where('vessel_id', '=', vesselId)
		.where('requested_at', '>=', from)
		.where('requested_at', '<', to)
		.orderBy('requested_at')
		.execute();
	const missed = rows.filter((r) => r.outcome === 'missed');
	return {
		done: rows.filter((r) => r.outcome === 'done' || r.outcome === 'valve_stuck_open').length,
		missed: missed.length,
		missedAt: missed.map((r) => r.requested_at)
	};
}

/** The vessels a user's digest covers. */
async function vesselsOf(db: Db, user: { id: string; role: Parameters<typeof inCrewAudience>[0] }) {
	if (inCrewAudience(user.role)) {
		return db
			.selectFrom('vessel_members')
			.innerJoin('vessels', 'vessels.id', 'vessel_members.vessel_id')
			.select(['vessels.id', 'vessels.time_zone'])
			.where('vessel_members.user_id', '=', user.id)
			.orderBy('vessels.id')
			.execute();
	}
	return db.selectFrom('vessels').select(['id', 'time_zone']).orderBy('id').execute();
}

export interface DigestSent {
	userId: string;
	email: string;
	localDate: string;
	outboxId: number;
}

/**
 * Sends every digest due at `now` (the cron calls it every 15 minutes; tests
 * call it with a fixed clock). Returns what it queued.
 */
export async function sendDigests(db: Db, now: number): Promise<DigestSent[]> {
	const users = await db
		.selectFrom('users')
		.innerJoin('user_preferences', 'user_preferences.user_id', 'users.id')
		.select(['users.id', 'users.email', 'users.name', 'users.role'])
		.where('users.disabled_at', 'is', null)
		.where('user_preferences.digest_hour', 'is not', null)
		.execute();
	const sent: DigestSent[] = [];
	for (const user of users) {
		const prefs = await getPreferences(db, user.id);
		if (prefs.digest_hour === null) continue;
		const vessels = await vesselsOf(db, user);
		const members = inCrewAudience(user.role) ? vessels.map((v) => v.time_zone) : [];
		const zone = digestZone(members, user.role, prefs.time_zone);
		const slot = digestSlot(zone, prefs.digest_hour, now);
		if (!slot) continue;
		const period = { from: slot.from, to: slot.at };
		const outboxId = await db.transaction().execute(async (trx) => {
			// claimed first: whoever inserts the day's row sends it, nobody else
			const claim = await trx
				.insertInto('notify_digests')
				.values({
					user_id: user.id,
					local_date: slot.localDate,
					period_from: period.from,
					period_to: period.to,
					outbox_id: null,
					sent_at: now
				})
				.onConflict((oc) => oc.columns(['user_id', 'local_date']).doNothing())
				.executeTakeFirst();
			if (!Number(claim.numInsertedOrUpdatedRows ?? 0)) return null;
			const data: DailyDigestData = {
				recipient: { name: user.name, units: prefs.units },
				period,
				timeZone: zone,
				vessels: await buildDigestVessels(
					trx,
					vessels.map((v) => v.id),
					period
				)
			};
			const rendered = renderMail(
				{ kind: 'daily_digest', data },
				mailEnv({ ORIGIN: maybeContext()?.config.ORIGIN })
			);
			const id = await enqueueMail(trx, {
				kind: 'daily_digest',
				to: user.email,
				toUserId: user.id,
				...rendered,
				threadKey: null,
				notBefore: deliverableAt(prefs, 'digest', now)
			});
			await trx
				.updateTable('notify_digests')
				.set({ outbox_id: id })
				.where('user_id', '=', user.id)
				.where('local_date', '=', slot.localDate)
				.execute();
			return id;
		});
		if (outboxId !== null) {
			sent.push({ userId: user.id, email: user.email, localDate: slot.localDate, outboxId });
		}
	}
	return sent;
}
