/**
 * Each vessel's notification settings (escalation time, incident hold-off) and
 * the overview of who receives what about the vessel, for the API and the page.
 * Changing them is for admins, fleet managers and the vessel's chief engineer
 * ('notifications.settings'); every change is audited with old and new values.
 */
import type { Kysely } from 'kysely';
import { z } from 'zod';
import { ROLE_LABELS, type Role } from '$lib/types';
import { ApiError, notFound } from '../api/errors';
import { audit, diff, type Actor } from '../audit';
import type { Database } from '../db/schema';
import { getPreferences, wantsByEmail } from '../mail/preferences';
import { MAIL_PRIORITIES, type MailPriority } from '../mail/templates/types';
import {
	digestZone,
	inCrewAudience,
	inEscalationAudience,
	NOTIFY_DEFAULTS,
	POLICY_FIGURES,
	type NotifySettingsValues
} from './policy';

const DAY_S = 86_400;

/**
 * PUT body: fields left out keep their value. Short escalation times are
 * allowed (down to 1 s) because the vessel's own procedure decides; the page
 * shows the default beside the field.
 */
export const notifySettingsUpdate = z
	.object({
		escalation_after_s: z
			.number('seconds, a whole number from 1 to 86400')
			.int('a whole number of seconds')
			.min(1, 'at least 1 s')
			.max(DAY_S, 'at most 86400 s (24 h)')
			.optional(),
		incident_holdoff_s: z
			.number('seconds, a whole number from 0 to 86400')
			.int('a whole number of seconds')
			.min(0, 'at least 0 s')
			.max(DAY_S, 'at most 86400 s (24 h)')
			.optional()
	})
	.strict();
export type NotifySettingsUpdate = z.infer<typeof notifySettingsUpdate>;

/** Validates an update; a misspelt field is refused by name, so it cannot be silently ignored. */
export function parseSettingsUpdate(body: unknown): NotifySettingsUpdate {
	const parsed = notifySettingsUpdate.safeParse(body);
	if (parsed.success) return parsed.data;
	const fields: Record<string, string> = {};
	for (const issue of parsed.error.issues) {
		if (issue.code === 'unrecognized_keys') {
			for (const key of issue.keys) fields[key] ??= 'not a notification setting';
		} else {
			fields[issue.path.join('.') || '_'] ??= issue.message;
		}
	}
	const [name, message] = Object.entries(fields)[0] ?? ['_', 'invalid input'];
	throw new ApiError(422, 'invalid', name === '_' ? message : `${name}: ${message}`, fields);
}

export interface StoredSettings extends NotifySettingsValues {
	updated_at: number | null;
	updated_by: string | null;
}

export async function getSettings(db: Kysely<Database>, vesselId: number): Promise<StoredSettings> {
	const row = await db
		.selectFrom('vessel_notification_settings')
		.selectAll()
		.where('vessel_id', '=', vesselId)
		.executeTakeFirst();
	return {
		escalation_after_s: row?.escalation_after_s ?? NOTIFY_DEFAULTS.escalation_after_s,
		incident_holdoff_s: row?.incident_holdoff_s ?? NOTIFY_DEFAULTS.incident_holdoff_s,
		updated_at: row?.updated_at ?? null,
		updated_by: row?.updated_by ?? null
	};
}

/** Every vessel's settings at once, for the timers (vessels without a row use the defaults). */
export async function allSettings(
	db: Kysely<Database>
): Promise<(vesselId: number) => NotifySettingsValues> {
	const rows = await db.selectFrom('vessel_notification_settings').selectAll().execute();
	const map = new Map(rows.map((r) => [r.vessel_id, r]));
	return (vesselId) => ({
		escalation_after_s: map.get(vesselId)?.escalation_after_s ?? NOTIFY_DEFAULTS.escalation_after_s,
		incident_holdoff_s: map.get(vesselId)?.incident_holdoff_s ?? NOTIFY_DEFAULTS.incident_holdoff_s
	});
}

export async function saveSettings(
	db: Kysely<Database>,
	actor: Actor,
	vesselId: number,
	update: NotifySettingsUpdate
): Promise<StoredSettings> {
	const vessel = await db
		.selectFrom('vessels')
		.select('id')
		.where('id', '=', vesselId)
		.executeTakeFirst();
	if (!vessel) throw notFound('vessel');
	const before = await getSettings(db, vesselId);
	const next: NotifySettingsValues = {
		escalation_after_s: update.escalation_after_s ?? before.escalation_after_s,
		incident_holdoff_s: update.incident_holdoff_s ?? before.incident_holdoff_s
	};
	const changes = diff(
		{
			escalation_after_s: before.escalation_after_s,
			incident_holdoff_s: before.incident_holdoff_s
		},
		next
	);
	if (!Object.keys(changes).length) return before;
	const values = { ...next, updated_at: Date.now(), updated_by: actor.name };
	await db.transaction().execute(async (trx) => {
		await trx
			.insertInto('vessel_notification_settings')
			.values({ vessel_id: vesselId, ...values })
			.onConflict((oc) => oc.column('vessel_id').doUpdateSet(values))
			.execute();
		await audit(trx, actor, {
			action: 'notification_settings.update',
			entity: 'vessel',
			entityId: vesselId,
			vesselId,
			details: changes
		});
	});
	return { ...next, updated_at: values.updated_at, updated_by: values.updated_by };
}

// ---- who receives what ----

export interface RecipientOverview {
	user_id: string;
	name: string;
	email: string;
	role: Role;
	role_label: string;
	units: 'metric' | 'us';
	gets: {
		/** priorities e-mailed as they are raised on this vessel */
		raised: MailPriority[];
		/** unacknowledged alarm-priority incidents after escalation_after_s */
		escalation: boolean;
		/** local hour of the daily digest (which covers this vessel); null for none */
		digest: number | null;
	};
	/** the zone the digest hour is read in */
	digest_time_zone: string | null;
	/** warnings, cautions and the digest wait for its end; alarms never do */
	quiet_hours: { from: string; to: string } | null;
}

export async function overview(db: Kysely<Database>, vesselId: number) {
	const vessel = await db
		.selectFrom('vessels')
		.select(['id', 'name', 'time_zone'])
		.where('id', '=', vesselId)
		.executeTakeFirst();
	if (!vessel) throw notFound('vessel');
	const settings = await getSettings(db, vesselId);
	const members = await db
		.selectFrom('vessel_members')
		.select('user_id')
		.where('vessel_id', '=', vesselId)
		.execute();
	const memberIds = new Set(members.map((m) => m.user_id));
	const users = await db
		.selectFrom('users')
		.select(['id', 'name', 'email', 'role', 'units'])
		.where('disabled_at', 'is', null)
		.orderBy('name')
		.execute();
	const zones = await db
		.selectFrom('vessel_members')
		.innerJoin('vessels', 'vessels.id', 'vessel_members.vessel_id')
		.select(['vessel_members.user_id', 'vessels.time_zone'])
		.execute();

	const recipients: RecipientOverview[] = [];
	for (const u of users) {
		const crew = inCrewAudience(u.role) && memberIds.has(u.id);
		const escalates = inEscalationAudience(u.role);
		const prefs = await getPreferences(db, u.id);
		// the digest covers this vessel for its crew and for the fleet-wide roles
		const digestCovers = crew || !inCrewAudience(u.role);
		const digest = digestCovers ? prefs.digest_hour : null;
		if (!crew && !escalates && digest === null) continue;
		const memberZones = zones.filter((z) => z.user_id === u.id).map((z) => z.time_zone);
		recipients.push({
			user_id: u.id,
			name: u.name,
			email: u.email,
			role: u.role,
			role_label: ROLE_LABELS[u.role],
			units: u.units,
			gets: {
				raised: crew ? MAIL_PRIORITIES.filter((p) => wantsByEmail(prefs, u.role, p)) : [],
				escalation: escalates && wantsByEmail(prefs, u.role, 'alarm'),
				digest
			},
			digest_time_zone: digest === null ? null : digestZone(memberZones, u.role, prefs.time_zone),
			quiet_hours: prefs.quiet_hours
		});
	}
	// what nobody receives is worth saying out loud
	const gaps: string[] = [];
	if (!recipients.some((r) => r.gets.raised.includes('alarm'))) {
		gaps.push('Nobody on board receives this vessel’s alarms by e-mail: it has no crew members.');
	}
	if (!recipients.some((r) => r.gets.escalation)) {
		gaps.push('No fleet manager receives escalations of unacknowledged alarms.');
	}
	return {
		vessel_id: vessel.id,
		vessel_name: vessel.name,
		time_zone: vessel.time_zone,
		escalation_after_s: settings.escalation_after_s,
		incident_holdoff_s: settings.incident_holdoff_s,
		updated_at: settings.updated_at,
		updated_by: settings.updated_by,
		defaults: { ...NOTIFY_DEFAULTS },
		policy: POLICY_FIGURES,
		recipients,
		gaps
	};
}
export type NotificationOverview = Awaited<ReturnType<typeof overview>>;
