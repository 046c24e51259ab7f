/** The audit log: every change to configuration or state, with who and when. */
import type { Kysely, Transaction } from 'kysely';
import type { Database } from './db/schema';

export interface Actor {
	/** null for the system itself (scheduler, rules) */
	userId: string | null;
	/** who, in words: an e-mail address or 'system' */
	name: string;
}

export const SYSTEM: Actor = { userId: null, name: 'system' };

export function actorOf(user: { id: string; email: string } | null): Actor {
	return user ? { userId: user.id, name: user.email } : SYSTEM;
}

export interface AuditEntry {
	action: string;
	entity: string;
	entityId?: string | number | null;
	vesselId?: number | null;
	details?: Record<string, unknown>;
	at?: number;
}

export async function audit(
	db: Kysely<Database> | Transaction<Database>,
	actor: Actor,
	entry: AuditEntry
): Promise<void> {
	await db
		.insertInto('audit_log')
		.values({
			at: entry.at ?? Date.now(),
			user_id: actor.userId,
			actor: actor.name,
			action: entry.action,
			entity: entry.entity,
			entity_id: entry.entityId === undefined || entry.entityId === null ? null : String(entry.entityId),
			vessel_id: entry.vesselId ?? null,
			details: entry.details ? JSON.stringify(entry.details) : null
		})
		.execute();
}

/** Only the fields that changed, as {field: {from, to}}: what an audit reader wants. */
export function diff<T extends object>(before: T, after: Partial<T>) {
	const changes: Record<string, { from: unknown; to: unknown }> = {};
	for (const [key, value] of Object.entries(after)) {
		if (value !== undefined && JSON.stringify(before[key as keyof T]) !== JSON.stringify(value)) {
			changes[key] = { from: before[key as keyof T], to: value };
		}
	}
	return changes;
}
