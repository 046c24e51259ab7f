/**
 * The migrations in /migrations, bundled into the server build by Vite so the
 * built app migrates at start-up without a TypeScript loader. (Scripts run by
 * tsx, where import.meta.glob does not exist, use fileMigrations() instead.)
 */
import type { Migration, MigrationProvider } from 'kysely';
import { providerFrom } from './migrate';

export function bundledMigrations(): MigrationProvider {
	return providerFrom(import.meta.glob<Migration>('/migrations/*.ts', { eager: true }));
}
