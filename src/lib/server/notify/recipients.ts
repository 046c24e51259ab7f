/**
 * The people a message can go to, with their preferences: a vessel's crew
 * (members in on-board roles), the fleet managers, and everyone who already
 * has a message in a thread. Disabled accounts receive nothing.
 */
import type { Kysely } from 'kysely';
import type { Role } from '$lib/types';
import type { Database } from '../db/schema';
import { getPreferences, type NotificationPreferences } from '../mail/preferences';
import { inCrewAudience, inEscalationAudience } from './policy';

export interface Recipient {
	id: string;
	email: string;
	name: string;
	role: Role;
	prefs: NotificationPreferences;
}

async function withPrefs(
	db: Kysely<Database>,
	rows: { id: string; email: string; name: string; role: Role }[]
): Promise<Recipient[]> {
	const out: Recipient[] = [];
	for (const r of rows) out.push({ ...r, prefs: await getPreferences(db, r.id) });
	return out;
}

/** The vessel's chief engineers and technicians. */
export async function crewOf(db: Kysely<Database>, vesselId: number): Promise<Recipient[]> {
	const rows = await db
		.selectFrom('vessel_members')
		.innerJoin('users', 'users.id', 'vessel_members.user_id')
		.select(['users.id', 'users.email', 'users.name', 'users.role'])
		.where('vessel_members.vessel_id', '=', vesselId)
		.where('users.disabled_at', 'is', null)
		.orderBy('users.name')
		.execute();
	return withPrefs(
		db,
		rows.filter((r) => inCrewAudience(r.role))
	);
}

/** Every fleet manager: escalations are fleet-wide. */
export async function fleetManagers(db: Kysely<Database>): Promise<Recipient[]> {
	const rows = await db
		.selectFrom('users')
		.select(['id', 'email', 'name', 'role'])
		.where('disabled_at', 'is', null)
		.orderBy('name')
		.execute();
	return withPrefs(
		db,
		rows.filter((r) => inEscalationAudience(r.role))
	);
}

/** Everyone who has a message in the thread, first told first. */
export async function threadRecipients(
	db: Kysely<Database>,
	threadId: number
): Promise<Recipient[]> {
	const rows = await db
		.selectFrom('notify_sends')
		.innerJoin('users', 'users.id', 'notify_sends.user_id')
		.select(['users.id', 'users.email', 'users.name', 'users.role'])
		.select((eb) => eb.fn.min('notify_sends.id').as('first'))
		.where('notify_sends.thread_id', '=', threadId)
		.where('users.disabled_at', 'is', null)
		.groupBy('users.id')
		.orderBy('first')
		.execute();
	return withPrefs(
		db,
		rows.map(({ first: _first, ...r }) => r)
	);
}

/** Message-IDs of the thread's messages to this user, oldest first: In-Reply-To and References. */
export async function threadChain(db: Kysely<Database>, threadId: number, userId: string) {
	const rows = await db
		.selectFrom('notify_sends')
		.innerJoin('mail_outbox', 'mail_outbox.id', 'notify_sends.outbox_id')
		.select('mail_outbox.message_id')
		.where('notify_sends.thread_id', '=', threadId)
		.where('notify_sends.user_id', '=', userId)
		.orderBy('mail_outbox.id')
		.execute();
	// one flood summary can be the message of several incidents: each Message-ID once
	const ids = [...new Set(rows.map((r) => r.message_id))];
	return { inReplyTo: ids.at(-1) ?? null, references: ids };
}

/** A person's name for "acknowledged by": the user's name, else what the actor was called. */
export async function actorName(
	db: Kysely<Database>,
	userId: string | null,
	actor: string
): Promise<string> {
	const row = userId
		? await db.selectFrom('users').select('name').where('id', '=', userId).executeTakeFirst()
		: await db
				.selectFrom('users')
				.select('name')
				.where('email', '=', actor.trim().toLowerCase())
				.executeTakeFirst();
	return row?.name ?? actor;
}
