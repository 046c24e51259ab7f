/**
 * A Kysely that only compiles: the writer thread builds its statements with
 * the same typed query builder as the rest of the app, compiles each once,
 * and runs it through a cached better-sqlite3 prepared statement (Kysely's
 * per-call overhead costs ~15 % on the hot insert path; PERFORMANCE.md).
 */
import {
	DummyDriver,
	Kysely,
	SqliteAdapter,
	SqliteIntrospector,
	SqliteQueryCompiler
} from 'kysely';
import type { Database } from '../db/schema';

export const compiler = new Kysely<Database>({
	dialect: {
		createAdapter: () => new SqliteAdapter(),
		createDriver: () => new DummyDriver(),
		createIntrospector: (db) => new SqliteIntrospector(db),
		createQueryCompiler: () => new SqliteQueryCompiler()
	}
});
