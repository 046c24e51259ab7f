/**
 * When a shaft's minimum flow changes (its diameter or its factor corrected),
 * the change is kept: samples are judged — in alarms, in the rollups' time
 * below the minimum and in compliance figures — against the minimum in force
 * when they were measured, and a report says which minimums applied.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<any>): Promise<void> {
	await sql`create table shaft_minimum_changes (
		shaft_id integer not null references shafts(id) on delete cascade,
		changed_at integer not null,
		from_lpm real not null,
		to_lpm real not null,
		changed_by text,
		primary key (shaft_id, changed_at)
	) without rowid`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('shaft_minimum_changes').execute();
}
