/**
 * Opening the SQLite file with the pragmas a server needs. Both the main
 * thread (Kysely, lucia) and the ingest writer thread open connections here.
 */
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import Database from 'better-sqlite3';
import { Kysely, SqliteDialect } from 'kysely';
import type { Database as Schema } from './schema';

export type Sqlite = Database.Database;

export function openSqlite(path: string, options: { readonly?: boolean } = {}): Sqlite {
	if (path !== ':memory:') mkdirSync(dirname(path), { recursive: true });
	const sqlite = new Database(path, { readonly: options.readonly ?? false });
	// WAL lets readers and the one writer work at once; NORMAL sync in WAL mode
	// can lose the last commits on power loss but never corrupts the file
	// (https://www.sqlite.org/pragma.html#pragma_synchronous).
	sqlite.pragma('journal_mode = WAL');
	sqlite.pragma('synchronous = NORMAL');
	sqlite.pragma('foreign_keys = ON');
	sqlite.pragma('busy_timeout = 5000'); // ms: the writer thread holds short transactions
	sqlite.pragma('wal_autocheckpoint = 10000'); // pages; fewer, larger checkpoints under ingest
	return sqlite;
}

export function createKysely(sqlite: Sqlite): Kysely<Schema> {
	return new Kysely<Schema>({ dialect: new SqliteDialect({ database: sqlite }) });
}
