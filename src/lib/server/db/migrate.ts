import { Migrator, type Kysely, type Migration, type MigrationProvider } from 'kysely';

/** Runs every pending migration; throws with the failing migration's name. */
export async function migrateToLatest(db: Kysely<any>, provider: MigrationProvider): Promise<string[]> {
	const migrator = new Migrator({ db, provider });
	const { error, results } = await migrator.migrateToLatest();
	const failed = results?.find((r) => r.status === 'Error');
	if (error || failed) {
		const name = failed ? ` in ${failed.migrationName}` : '';
		throw new Error(`database migration failed${name}: ${String(error)}`, { cause: error });
	}
	return (results ?? []).map((r) => r.migrationName);
}

/** A provider from modules already loaded (by import.meta.glob or by hand). */
export function providerFrom(modules: Record<string, Migration>): MigrationProvider {
	return {
		async getMigrations() {
			const out: Record<string, Migration> = {};
			for (const [path, mod] of Object.entries(modules)) {
				const name = path.split('/').pop()!.replace(/\.[jt]s$/, '');
				out[name] = mod;
			}
			return out;
		}
	};
}

/** The migration files read from /migrations at run time (for scripts run by tsx). */
export async function fileMigrations(): Promise<MigrationProvider> {
	const { promises: fs } = await import('node:fs');
	const path = await import('node:path');
	const { FileMigrationProvider } = await import('kysely');
	return new FileMigrationProvider({
		fs,
		path,
		migrationFolder: path.resolve(import.meta.dirname, '../../../../migrations')
	});
}
