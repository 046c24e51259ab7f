/**
 * `npm run migrate`: bring the database at DATABASE_PATH up to date, without
 * starting the server. Reads the migration files from /migrations directly.
 */
import { loadConfig } from '../config';
import { createKysely, openSqlite } from './connection';
import { fileMigrations, migrateToLatest } from './migrate';

const config = loadConfig();
const db = createKysely(openSqlite(config.DATABASE_PATH));
try {
	const applied = await migrateToLatest(db, await fileMigrations());
	console.log(
		applied.length ? `applied: ${applied.join(', ')}` : 'database is up to date',
		`(${config.DATABASE_PATH})`
	);
} finally {
	await db.destroy();
}
