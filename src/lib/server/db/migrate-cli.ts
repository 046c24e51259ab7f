/**
 * `npm run migrate`: bring the database at DATABASE_PATH up to date, without
 * starting the server. Reads the migration files from /migrations directly.
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { FileMigrationProvider } from 'kysely';
import { loadConfig } from '../config';
import { createKysely, openSqlite } from './connection';
import { migrateToLatest } from './migrate';

const config = loadConfig();
const sqlite = openSqlite(config.DATABASE_PATH);
const db = createKysely(sqlite);
const provider = new FileMigrationProvider({
	fs,
	path,
	migrationFolder: path.resolve(import.meta.dirname, '../../../../migrations')
});
try {
	const applied = await migrateToLatest(db, provider);
	console.log(
		applied.length ? `applied: ${applied.join(', ')}` : 'database is up to date',
		`(${config.DATABASE_PATH})`
	);
} finally {
	await db.destroy();
}
