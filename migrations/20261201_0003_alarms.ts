/**
 * Alarms: settings per shaft (and per vessel for its separator), alarm
 * instances (raise → return to normal) with their ISA-18.2 status, every
 * transition as an event, and alarm types taken out of service by hand.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('alarm_settings')
		.addColumn('shaft_id', 'integer', (c) => c.primaryKey().references('shafts.id').onDelete('cascade'))
		.addColumn('settings', 'text', (c) => c.notNull()) // JSON, validated by the alarmSettings schema
		.addColumn('updated_at', 'integer', (c) => c.notNull())
		.addColumn('updated_by', 'text')
		.execute();

	await db.schema
		.createTable('vessel_alarm_settings')
		.addColumn('vessel_id', 'integer', (c) => c.primaryKey().references('vessels.id').onDelete('cascade'))
		.addColumn('settings', 'text', (c) => c.notNull())
		.addColumn('updated_at', 'integer', (c) => c.notNull())
		.addColumn('updated_by', 'text')
		.execute();

	await db.schema
		.createTable('alarms')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('vessel_id', 'integer', (c) => c.notNull().references('vessels.id').onDelete('cascade'))
		.addColumn('shaft_id', 'integer', (c) => c.references('shafts.id').onDelete('cascade'))
		.addColumn('type', 'text', (c) => c.notNull())
		.addColumn('priority', 'text', (c) => c.notNull().check(sql`priority in ('alarm', 'warning', 'caution')`))
		.addColumn('state', 'text', (c) => c.notNull())
		.addColumn('active', 'integer', (c) => c.notNull())
		.addColumn('acknowledged', 'integer', (c) => c.notNull())
		.addColumn('shelved_until', 'integer')
		.addColumn('suppressed', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('out_of_service', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('raised_at', 'integer', (c) => c.notNull())
		.addColumn('value', 'real') // the value that raised it
		.addColumn('limit_value', 'real') // the limit it crossed (e.g. the minimum flow)
		.addColumn('last_value', 'real')
		.addColumn('cleared_at', 'integer') // condition last cleared
		.addColumn('acknowledged_at', 'integer')
		.addColumn('acknowledged_by', 'text')
		.addColumn('ended_at', 'integer') // returned to normal: the instance is closed
		.addColumn('updated_at', 'integer', (c) => c.notNull())
		.execute();
	await db.schema.createIndex('alarms_vessel_open').on('alarms').columns(['vessel_id', 'ended_at']).execute();
	await db.schema.createIndex('alarms_shaft_raised').on('alarms').columns(['shaft_id', 'raised_at']).execute();
	await db.schema.createIndex('alarms_raised').on('alarms').column('raised_at').execute();

	await db.schema
		.createTable('alarm_events')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('alarm_id', 'integer', (c) => c.notNull().references('alarms.id').onDelete('cascade'))
		.addColumn('at', 'integer', (c) => c.notNull())
		.addColumn('event', 'text', (c) => c.notNull())
		.addColumn('from_state', 'text')
		.addColumn('to_state', 'text', (c) => c.notNull())
		.addColumn('user_id', 'text')
		.addColumn('actor', 'text', (c) => c.notNull())
		.addColumn('value', 'real')
		.addColumn('comment', 'text')
		.execute();
	await db.schema.createIndex('alarm_events_alarm').on('alarm_events').columns(['alarm_id', 'at']).execute();

	await db.schema
		.createTable('alarm_removals')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('vessel_id', 'integer', (c) => c.notNull().references('vessels.id').onDelete('cascade'))
		.addColumn('shaft_id', 'integer', (c) => c.references('shafts.id').onDelete('cascade'))
		.addColumn('type', 'text', (c) => c.notNull())
		.addColumn('reason', 'text', (c) => c.notNull())
		.addColumn('removed_at', 'integer', (c) => c.notNull())
		.addColumn('removed_by', 'text', (c) => c.notNull())
		.addColumn('returned_at', 'integer')
		.addColumn('returned_by', 'text')
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['alarm_removals', 'alarm_events', 'alarms', 'vessel_alarm_settings', 'alarm_settings']) {
		await db.schema.dropTable(t).execute();
	}
}
