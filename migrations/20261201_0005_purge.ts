/**
 * Separator purge: the schedule per vessel's separator, and every purge
 * command with who or what asked and how it turned out.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('purge_schedules')
		.addColumn('vessel_id', 'integer', (c) => c.primaryKey().references('vessels.id').onDelete('cascade'))
		.addColumn('enabled', 'integer', (c) => c.notNull())
		.addColumn('interval_min', 'integer', (c) => c.notNull())
		.addColumn('duration_s', 'integer', (c) => c.notNull())
		.addColumn('offset_min', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('quiet_hours', 'text', (c) => c.notNull().defaultTo('[]')) // JSON [{from, to}]
		.addColumn('updated_at', 'integer', (c) => c.notNull())
		.addColumn('updated_by', 'text')
		.execute();

	await db.schema
		.createTable('purge_commands')
		.addColumn('id', 'text', (c) => c.primaryKey()) // the command id sent to the gateway
		.addColumn('vessel_id', 'integer', (c) => c.notNull().references('vessels.id').onDelete('cascade'))
		.addColumn('requested_at', 'integer', (c) => c.notNull())
		.addColumn('requested_by', 'text', (c) => c.notNull()) // an e-mail address, or 'schedule'
		.addColumn('user_id', 'text')
		.addColumn('source', 'text', (c) => c.notNull().check(sql`source in ('schedule', 'manual')`))
		.addColumn('duration_s', 'integer', (c) => c.notNull())
		.addColumn('outcome', 'text', (c) =>
			c.notNull().defaultTo('pending').check(sql`outcome in ('pending', 'done', 'missed', 'valve_stuck_open')`)
		)
		.addColumn('finding', 'text')
		.addColumn('opened_at', 'integer')
		.addColumn('closed_at', 'integer')
		.addColumn('decided_at', 'integer')
		.addColumn('dp_before_bar', 'real')
		.addColumn('dp_after_bar', 'real')
		.execute();
	await db.schema
		.createIndex('purge_commands_vessel')
		.on('purge_commands')
		.columns(['vessel_id', 'requested_at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('purge_commands').execute();
	await db.schema.dropTable('purge_schedules').execute();
}
