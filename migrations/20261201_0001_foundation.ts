/**
 * Foundation: people, sessions, the fleet and its configuration, gateways,
 * API tokens and the audit log. Times are epoch milliseconds (INTEGER) except
 * sessions.expires_at, which lucia's SQLite adapter keeps in epoch seconds.
 * Frozen in time: never import application code here.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('users')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('email', 'text', (c) => c.notNull().unique().modifyEnd(sql`collate nocase`))
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('role', 'text', (c) =>
			c
				.notNull()
				.check(
					sql`role in ('admin', 'fleet_manager', 'chief_engineer', 'technician', 'shore_office')`
				)
		)
		.addColumn('password_hash', 'text')
		.addColumn('units', 'text', (c) =>
			c.notNull().defaultTo('metric').check(sql`units in ('metric', 'us')`)
		)
		.addColumn('disabled_at', 'integer')
		.addColumn('password_changed_at', 'integer')
		.addColumn('created_at', 'integer', (c) => c.notNull())
		.execute();

	await db.schema
		.createTable('sessions')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		.addColumn('expires_at', 'integer', (c) => c.notNull())
		.execute();
	await db.schema.createIndex('sessions_user').on('sessions').column('user_id').execute();

	await db.schema
		.createTable('vessels')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('code', 'text', (c) => c.notNull().unique())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('kind', 'text')
		.addColumn('time_zone', 'text', (c) => c.notNull().defaultTo('UTC'))
		.addColumn('salinity_psu', 'real')
		.addColumn('operating_mode', 'text', (c) =>
			c
				.notNull()
				.defaultTo('at_sea')
				.check(sql`operating_mode in ('at_sea', 'in_port', 'dry_dock')`)
		)
		.addColumn('created_at', 'integer', (c) => c.notNull())
		.execute();

	await db.schema
		.createTable('shafts')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('vessel_id', 'integer', (c) =>
			c.notNull().references('vessels.id').onDelete('cascade')
		)
		.addColumn('code', 'text', (c) => c.notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('position', 'text', (c) =>
			c.notNull().defaultTo('centre').check(sql`position in ('port', 'starboard', 'centre')`)
		)
		.addColumn('diameter_mm', 'real', (c) => c.notNull())
		.addColumn('water', 'text', (c) =>
			c.notNull().defaultTo('sea').check(sql`water in ('sea', 'fresh')`)
		)
		.addColumn('centreline_depth_m', 'real', (c) => c.notNull().defaultTo(0))
		.addColumn('min_flow_factor_lpm_per_mm', 'real', (c) => c.notNull().defaultTo(0.15))
		.addColumn('created_at', 'integer', (c) => c.notNull())
		.addUniqueConstraint('shafts_vessel_code', ['vessel_id', 'code'])
		.execute();

	await db.schema
		.createTable('vessel_members')
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		.addColumn('vessel_id', 'integer', (c) =>
			c.notNull().references('vessels.id').onDelete('cascade')
		)
		.addPrimaryKeyConstraint('vessel_members_pk', ['user_id', 'vessel_id'])
		.execute();
	await db.schema
		.createIndex('vessel_members_vessel')
		.on('vessel_members')
		.column('vessel_id')
		.execute();

	await db.schema
		.createTable('gateways')
		.addColumn('vessel_id', 'integer', (c) =>
			c.primaryKey().references('vessels.id').onDelete('cascade')
		)
		.addColumn('username', 'text', (c) => c.notNull().unique())
		.addColumn('password_hash', 'text', (c) => c.notNull())
		.addColumn('issued_at', 'integer', (c) => c.notNull())
		.addColumn('issued_by', 'text')
		.execute();

	await db.schema
		.createTable('api_tokens')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('created_at', 'integer', (c) => c.notNull())
		.addColumn('last_used_at', 'integer')
		.addColumn('revoked_at', 'integer')
		.execute();

	await db.schema
		.createTable('audit_log')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('at', 'integer', (c) => c.notNull())
		.addColumn('user_id', 'text')
		.addColumn('actor', 'text', (c) => c.notNull())
		.addColumn('action', 'text', (c) => c.notNull())
		.addColumn('entity', 'text', (c) => c.notNull())
		.addColumn('entity_id', 'text')
		.addColumn('vessel_id', 'integer')
		.addColumn('details', 'text')
		.execute();
	await db.schema.createIndex('audit_log_at').on('audit_log').column('at').execute();
	await db.schema
		.createIndex('audit_log_vessel')
		.on('audit_log')
		.columns(['vessel_id', 'at'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of [
		'audit_log',
		'api_tokens',
		'gateways',
		'vessel_members',
		'shafts',
		'vessels',
		'sessions',
		'users'
	]) {
		await db.schema.dropTable(t).execute();
	}
}
