/**
 * Commissioning and maintenance records of a shaft's installation: seal
 * pressure tests, bearing bore and journal measurements, wear-down readings
 * with the wear limit, shrink-fit plans for liners, and attachments (photos,
 * PDFs). Records are evidence: rows are added, never edited; each keeps who
 * recorded it, even after the account is gone.
 */
import { sql, type CreateTableBuilder, type Kysely } from 'kysely';

function common<T extends string>(t: CreateTableBuilder<T, never>) {
	return t
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('shaft_id', 'integer', (c) =>
			c.notNull().references('shafts.id').onDelete('cascade')
		)
		.addColumn('vessel_id', 'integer', (c) =>
			c.notNull().references('vessels.id').onDelete('cascade')
		)
		.addColumn('recorded_by', 'text', (c) => c.references('users.id').onDelete('set null'))
		.addColumn('recorded_by_email', 'text', (c) => c.notNull())
		.addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('created_at', 'integer', (c) => c.notNull());
}

export async function up(db: Kysely<any>): Promise<void> {
	await common(db.schema.createTable('seal_tests'))
		.addColumn('seal', 'text', (c) => c.notNull().check(sql`seal in ('aft', 'forward', 'other')`))
		.addColumn('tested_at', 'integer', (c) => c.notNull())
		.addColumn('test_pressure_bar', 'real', (c) => c.notNull())
		.addColumn('hold_s', 'integer', (c) => c.notNull())
		.addColumn('resolution_bar', 'real', (c) => c.notNull())
		.addColumn('leak_seen', 'integer', (c) => c.notNull())
		.addColumn('readings', 'text', (c) => c.notNull()) // JSON [{t_s, pressure_bar}]
		.addColumn('result', 'text', (c) => c.notNull().check(sql`result in ('pass', 'fail')`))
		.addColumn('judgement', 'text', (c) => c.notNull()) // JSON SealTestJudgement
		.execute();

	await common(db.schema.createTable('bearing_measurements'))
		.addColumn('bearing', 'text', (c) =>
			c.notNull().check(sql`bearing in ('aft', 'forward', 'other')`)
		)
		.addColumn('measured_at', 'integer', (c) => c.notNull())
		.addColumn('bore_mm', 'real', (c) => c.notNull())
		.addColumn('journal_mm', 'real', (c) => c.notNull())
		.addColumn('max_clearance_mm', 'real')
		.addColumn('clearance_mm', 'real', (c) => c.notNull())
		.execute();

	await common(db.schema.createTable('wear_readings'))
		.addColumn('measured_at', 'integer', (c) => c.notNull())
		.addColumn('reading_mm', 'real', (c) => c.notNull())
		.addColumn('method', 'text', (c) =>
			c
				.notNull()
				.defaultTo('poker_gauge')
				.check(sql`method in ('poker_gauge', 'sensor', 'feeler', 'other')`)
		)
		.execute();

	await db.schema
		.createTable('wear_limits')
		.addColumn('shaft_id', 'integer', (c) =>
			c.primaryKey().references('shafts.id').onDelete('cascade')
		)
		.addColumn('wear_limit_mm', 'real', (c) => c.notNull())
		.addColumn('updated_at', 'integer', (c) => c.notNull())
		.addColumn('updated_by_email', 'text', (c) => c.notNull())
		.execute();

	await common(db.schema.createTable('shrink_fit_plans'))
		.addColumn('bore_mm', 'real', (c) => c.notNull())
		.addColumn('interference_mm', 'real', (c) => c.notNull())
		.addColumn('assembly_clearance_mm', 'real', (c) => c.notNull())
		.addColumn('material', 'text', (c) => c.notNull())
		.addColumn('alpha_per_k', 'real', (c) => c.notNull())
		.addColumn('ambient_c', 'real', (c) => c.notNull())
		.addColumn('delta_k', 'real', (c) => c.notNull())
		.addColumn('heat_to_c', 'real', (c) => c.notNull())
		.execute();

	await common(db.schema.createTable('record_attachments'))
		.addColumn('filename', 'text', (c) => c.notNull())
		.addColumn('content_type', 'text', (c) => c.notNull())
		.addColumn('size_bytes', 'integer', (c) => c.notNull())
		.addColumn('sha256', 'text', (c) => c.notNull())
		.addColumn('content', 'blob', (c) => c.notNull())
		.execute();

	for (const table of [
		'seal_tests',
		'bearing_measurements',
		'wear_readings',
		'shrink_fit_plans',
		'record_attachments'
	]) {
		await db.schema
			.createIndex(`${table}_shaft`)
			.on(table)
			.columns(['shaft_id', 'created_at'])
			.execute();
	}
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const table of [
		'record_attachments',
		'shrink_fit_plans',
		'wear_limits',
		'wear_readings',
		'bearing_measurements',
		'seal_tests'
	]) {
		await db.schema.dropTable(table).execute();
	}
}
