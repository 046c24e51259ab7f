/**
 * History: logger files uploaded for a shaft. The original file is kept with
 * its import record (what was imported, by whom, how each row fared), so an
 * import can always be traced back to the bytes the vessel sent.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('logger_imports')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('shaft_id', 'integer', (c) =>
			c.notNull().references('shafts.id').onDelete('cascade')
		)
		.addColumn('vessel_id', 'integer', (c) =>
			c.notNull().references('vessels.id').onDelete('cascade')
		)
		.addColumn('uploaded_by', 'text', (c) => c.references('users.id').onDelete('set null'))
		.addColumn('uploaded_by_email', 'text', (c) => c.notNull()) // who, even after the account is gone
		.addColumn('filename', 'text', (c) => c.notNull())
		.addColumn('content_type', 'text', (c) => c.notNull())
		.addColumn('size_bytes', 'integer', (c) => c.notNull())
		.addColumn('sha256', 'text', (c) => c.notNull())
		.addColumn('original', 'blob', (c) => c.notNull())
		.addColumn('mapping', 'text') // JSON: the column mapping last previewed or imported
		.addColumn('status', 'text', (c) =>
			c
				.notNull()
				.defaultTo('previewed')
				.check(sql`status in ('previewed', 'importing', 'imported', 'failed')`)
		)
		.addColumn('rows_total', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('rows_imported', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('rows_duplicate', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('rows_skipped', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('report', 'text') // JSON: counts and the first row-level problems
		.addColumn('error', 'text')
		.addColumn('created_at', 'integer', (c) => c.notNull())
		.addColumn('imported_at', 'integer')
		.execute();
	await db.schema
		.createIndex('logger_imports_shaft')
		.on('logger_imports')
		.columns(['shaft_id', 'created_at'])
		.execute();
	await db.schema
		.createIndex('logger_imports_vessel')
		.on('logger_imports')
		.columns(['vessel_id', 'created_at'])
		.execute();
	await db.schema
		.createIndex('logger_imports_sha')
		.on('logger_imports')
		.columns(['shaft_id', 'sha256'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('logger_imports').execute();
}
