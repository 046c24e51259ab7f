/**
 * Each user's notification preferences: which priorities reach them by
 * e-mail, the hour of their daily digest, a quiet period, the zone those
 * hours are read in, and their unit system (kept in users.units).
 *
 * The quiet period holds back digests and warning/caution e-mails, never an
 * alarm; and alarm priority always reaches on-board engineers, who cannot
 * switch it off. The alarm notification policy reads these with
 * getPreferences() and asks wantsByEmail() / deliverableAt().
 */
import { IANAZone, DateTime } from 'luxon';
import { z } from 'zod';
import { ONBOARD_ROLES, UNIT_SYSTEMS, type Role, type UnitSystem } from '$lib/types';
import { ApiError } from '../api/errors';
import { audit, diff, type Actor } from '../audit';
import type { AppContext } from '../context';
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import { MAIL_PRIORITIES, type MailPriority } from './templates/types';

export interface QuietHours {
	/** 'HH:MM', local to time_zone */
	from: string;
	to: string;
}

export interface NotificationPreferences {
	units: UnitSystem;
	/** which priorities are e-mailed as they happen (in alarm, warning, caution order) */
	notify_priorities: MailPriority[];
	/** local hour (0–23) of the daily digest; null = no digest */
	digest_hour: number | null;
	/** null = no quiet period; from > to wraps past midnight (22:00–06:00) */
	quiet_hours: QuietHours | null;
	/** IANA zone of digest_hour and quiet_hours */
	time_zone: string;
}

/** For a user who never saved any: alarms and warnings by e-mail, no digest, no quiet period. */
export const DEFAULT_PREFERENCES: Omit<NotificationPreferences, 'units'> = {
	notify_priorities: ['alarm', 'warning'],
	digest_hour: null,
	quiet_hours: null,
	time_zone: 'UTC'
};

const hhmm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'a time as HH:MM, 00:00 to 23:59');

/** PUT /api/me/preferences: fields left out keep their value. */
export const preferencesUpdate = z.object({
	units: z.enum(UNIT_SYSTEMS, 'metric or us').optional(),
	notify_priorities: z
		.array(z.enum(MAIL_PRIORITIES, 'alarm, warning or caution'), 'a list of priorities')
		.max(3)
		.transform((list) => MAIL_PRIORITIES.filter((p) => list.includes(p)))
		.optional(),
	digest_hour: z
		.number('an hour from 0 to 23, or null for no digest')
		.int('a whole hour')
		.min(0, 'an hour from 0 to 23')
		.max(23, 'an hour from 0 to 23')
		.nullable()
		.optional(),
	quiet_hours: z
		.object({ from: hhmm, to: hhmm }, '{from, to} as HH:MM, or null for none')
		.refine((q) => q.from !== q.to, { path: ['to'], message: 'must differ from the start' })
		.nullable()
		.optional(),
	time_zone: z
		.string()
		.refine((zone) => IANAZone.isValidZone(zone), 'an IANA time zone such as Europe/Oslo')
		.optional()
});
export type PreferencesUpdate = z.infer<typeof preferencesUpdate>;

export function isOnboard(role: Role): boolean {
	return ONBOARD_ROLES.includes(role);
}

export async function getPreferences(
	db: Kysely<Database>,
	userId: string
): Promise<NotificationPreferences> {
	const user = await db
		.selectFrom('users')
		.select('units')
		.where('id', '=', userId)
		.executeTakeFirst();
	const row = await db
		.selectFrom('user_preferences')
		.selectAll()
		.where('user_id', '=', userId)
		.executeTakeFirst();
	const units = user?.units ?? 'metric';
	if (!row)
		return {
			units,
			...DEFAULT_PREFERENCES,
			notify_priorities: [...DEFAULT_PREFERENCES.notify_priorities]
		};
	const flags: Record<MailPriority, number> = {
		alarm: row.notify_alarm,
		warning: row.notify_warning,
		caution: row.notify_caution
	};
	return {
		units,
		notify_priorities: MAIL_PRIORITIES.filter((p) => flags[p] === 1),
		digest_hour: row.digest_hour,
		quiet_hours: row.quiet_from && row.quiet_to ? { from: row.quiet_from, to: row.quiet_to } : null,
		time_zone: row.time_zone
	};
}

export async function savePreferences(
	ctx: AppContext,
	actor: Actor,
	user: { id: string; role: Role },
	input: PreferencesUpdate
): Promise<NotificationPreferences> {
	const before = await getPreferences(ctx.db, user.id);
	const next: NotificationPreferences = {
		units: input.units ?? before.units,
		notify_priorities: input.notify_priorities ?? before.notify_priorities,
		digest_hour: input.digest_hour === undefined ? before.digest_hour : input.digest_hour,
		quiet_hours: input.quiet_hours === undefined ? before.quiet_hours : input.quiet_hours,
		time_zone: input.time_zone ?? before.time_zone
	};
	if (isOnboard(user.role) && !next.notify_priorities.includes('alarm')) {
		throw new ApiError(
			422,
			'invalid',
			'notify_priorities: alarm priority always reaches on-board engineers',
			{
				notify_priorities: 'alarm priority always reaches on-board engineers'
			}
		);
	}
	const values = {
		notify_alarm: next.notify_priorities.includes('alarm') ? 1 : 0,
		notify_warning: next.notify_priorities.includes('warning') ? 1 : 0,
		notify_caution: next.notify_priorities.includes('caution') ? 1 : 0,
		digest_hour: next.digest_hour,
		quiet_from: next.quiet_hours?.from ?? null,
		quiet_to: next.quiet_hours?.to ?? null,
		time_zone: next.time_zone,
		updated_at: Date.now()
	};
	await ctx.db.transaction().execute(async (trx) => {
		if (next.units !== before.units) {
			await trx.updateTable('users').set({ units: next.units }).where('id', '=', user.id).execute();
		}
		await trx
			.insertInto('user_preferences')
			.values({ user_id: user.id, ...values })
			.onConflict((oc) => oc.column('user_id').doUpdateSet(values))
			.execute();
		const changes = diff(before, next);
		if (Object.keys(changes).length) {
			await audit(trx, actor, {
				action: 'user.preferences',
				entity: 'user',
				entityId: user.id,
				details: changes
			});
		}
	});
	return next;
}

// ---- rules the notification policy applies (pure) ----

/** Alarm priority always reaches on-board engineers; otherwise the user's choice. */
export function wantsByEmail(
	prefs: NotificationPreferences,
	role: Role,
	priority: MailPriority
): boolean {
	if (priority === 'alarm' && isOnboard(role)) return true;
	return prefs.notify_priorities.includes(priority);
}

function minutes(hm: string): number {
	const [h, m] = hm.split(':').map(Number);
	return h * 60 + m;
}

function localTime(prefs: Pick<NotificationPreferences, 'time_zone'>, at: number): DateTime {
	const local = DateTime.fromMillis(at, { zone: prefs.time_zone });
	return local.isValid ? local : DateTime.fromMillis(at, { zone: 'utc' });
}

/** Whether `at` falls in the user's quiet period (start included, end excluded). */
export function inQuietPeriod(
	prefs: Pick<NotificationPreferences, 'quiet_hours' | 'time_zone'>,
	at: number
): boolean {
	if (!prefs.quiet_hours) return false;
	const local = localTime(prefs, at);
	const now = local.hour * 60 + local.minute;
	const from = minutes(prefs.quiet_hours.from);
	const to = minutes(prefs.quiet_hours.to);
	return from < to ? now >= from && now < to : now >= from || now < to;
}

/**
 * When an e-mail may go out: at once, or (for a digest, a warning or a
 * caution inside the quiet period) when the quiet period ends. Never holds an
 * alarm. Pass the result as `notBefore` to enqueueMail().
 */
export function deliverableAt(
	prefs: Pick<NotificationPreferences, 'quiet_hours' | 'time_zone'>,
	what: MailPriority | 'digest',
	at: number
): number {
	if (what === 'alarm' || !prefs.quiet_hours || !inQuietPeriod(prefs, at)) return at;
	const local = localTime(prefs, at);
	const to = minutes(prefs.quiet_hours.to);
	let end = local.set({ hour: Math.floor(to / 60), minute: to % 60, second: 0, millisecond: 0 });
	if (end <= local) end = end.plus({ days: 1 });
	return end.toMillis();
}
