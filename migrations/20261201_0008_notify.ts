/**
 * Notification policy: each vessel's escalation and incident hold-off, the
 * incidents and threads that keep one alarm to one e-mail thread, who was sent
 * what (for "who was told and when" and the follow-ups), and the digests sent.
 * Times are epoch milliseconds (INTEGER). Frozen in time: never import application code here.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('vessel_notification_settings')
		.addColumn('vessel_id', 'integer', (c) =>
			c.primaryKey().references('vessels.id').onDelete('cascade')
		)
		// 300 s: the default time for the crew to acknowledge before shore is told
		.addColumn('escalation_after_s', 'integer', (c) =>
			c
				.notNull()
				.defaultTo(300)
				.check(sql`escalation_after_s between 1 and 86400`)
		)
		// 600 s: EEMUA 191's 10-minute window for alarm rates
		.addColumn('incident_holdoff_s', 'integer', (c) =>
			c
				.notNull()
				.defaultTo(600)
				.check(sql`incident_holdoff_s between 0 and 86400`)
		)
		.addColumn('updated_at', 'integer', (c) => c.notNull())
		.addColumn('updated_by', 'text')
		.execute();

	await db.schema
		.createTable('notify_threads')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('vessel_id', 'integer', (c) =>
			c.notNull().references('vessels.id').onDelete('cascade')
		)
		.addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('single', 'flood')`))
		.addColumn('thread_key', 'text', (c) => c.notNull().unique())
		.addColumn('told_at', 'integer', (c) => c.notNull())
		.addColumn('escalated_at', 'integer')
		.addColumn('ack_told_at', 'integer')
		.addColumn('normal_told_at', 'integer')
		.addColumn('closed_at', 'integer')
		.execute();
	await db.schema
		.createIndex('notify_threads_open')
		.on('notify_threads')
		.columns(['closed_at', 'vessel_id'])
		.execute();

	await db.schema
		.createTable('notify_incidents')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('vessel_id', 'integer', (c) =>
			c.notNull().references('vessels.id').onDelete('cascade')
		)
		.addColumn('shaft_id', 'integer', (c) => c.references('shafts.id').onDelete('cascade'))
		.addColumn('type', 'text', (c) => c.notNull())
		.addColumn('priority', 'text', (c) =>
			c.notNull().check(sql`priority in ('alarm', 'warning', 'caution')`)
		)
		.addColumn('first_alarm_id', 'integer', (c) =>
			c.notNull().references('alarms.id').onDelete('cascade')
		)
		.addColumn('current_alarm_id', 'integer', (c) =>
			c.notNull().references('alarms.id').onDelete('cascade')
		)
		.addColumn('instances', 'integer', (c) => c.notNull().defaultTo(1))
		.addColumn('opened_at', 'integer', (c) => c.notNull())
		.addColumn('phase', 'text', (c) =>
			c.notNull().check(sql`phase in ('hidden', 'pending', 'told', 'covered')`)
		)
		.addColumn('annunciated_at', 'integer')
		.addColumn('due_at', 'integer')
		.addColumn('thread_id', 'integer', (c) =>
			c.references('notify_threads.id').onDelete('set null')
		)
		.addColumn('unacked_since', 'integer')
		.addColumn('acknowledged_at', 'integer')
		.addColumn('acknowledged_by', 'text')
		.addColumn('ack_comment', 'text')
		.addColumn('ended_at', 'integer')
		.addColumn('closed_at', 'integer')
		.execute();
	await db.schema
		.createIndex('notify_incidents_alarm')
		.on('notify_incidents')
		.column('current_alarm_id')
		.execute();
	await db.schema
		.createIndex('notify_incidents_key')
		.on('notify_incidents')
		.columns(['vessel_id', 'shaft_id', 'type', 'closed_at'])
		.execute();
	await db.schema
		.createIndex('notify_incidents_phase')
		.on('notify_incidents')
		.columns(['phase', 'due_at'])
		.execute();
	await db.schema
		.createIndex('notify_incidents_thread')
		.on('notify_incidents')
		.column('thread_id')
		.execute();

	await db.schema
		.createTable('notify_sends')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('thread_id', 'integer', (c) =>
			c.notNull().references('notify_threads.id').onDelete('cascade')
		)
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('outbox_id', 'integer', (c) => c.notNull())
		.addColumn('at', 'integer', (c) => c.notNull())
		.execute();
	await db.schema
		.createIndex('notify_sends_thread')
		.on('notify_sends')
		.columns(['thread_id', 'user_id'])
		.execute();

	await db.schema
		.createTable('notify_digests')
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		.addColumn('local_date', 'text', (c) => c.notNull())
		.addColumn('period_from', 'integer', (c) => c.notNull())
		.addColumn('period_to', 'integer', (c) => c.notNull())
		.addColumn('outbox_id', 'integer')
		.addColumn('sent_at', 'integer', (c) => c.notNull())
		.addPrimaryKeyConstraint('notify_digests_pk', ['user_id', 'local_date'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of [
		'notify_digests',
		'notify_sends',
		'notify_incidents',
		'notify_threads',
		'vessel_notification_settings'
	]) {
		await db.schema.dropTable(t).execute();
	}
}
