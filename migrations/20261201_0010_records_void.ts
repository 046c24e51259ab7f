/**
 * Records are never edited or deleted, but a wrong one can be voided: it
 * stays, struck through, with who voided it, when and why, and no longer
 * counts (a voided first wear reading is no longer the baseline).
 */
import type { Kysely } from 'kysely';

const TABLES = [
	'seal_tests',
	'bearing_measurements',
	'wear_readings',
	'shrink_fit_plans',
	'record_attachments'
];

export async function up(db: Kysely<any>): Promise<void> {
	for (const table of TABLES) {
		await db.schema.alterTable(table).addColumn('voided_at', 'integer').execute();
		await db.schema.alterTable(table).addColumn('voided_by_email', 'text').execute();
		await db.schema.alterTable(table).addColumn('void_reason', 'text').execute();
	}
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const table of TABLES) {
		for (const column of ['void_reason', 'voided_by_email', 'voided_at']) {
			await db.schema.alterTable(table).dropColumn(column).execute();
		}
	}
}
