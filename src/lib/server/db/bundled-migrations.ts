/**
 * The migrations in /migrations, bundled into the server build by Vite so the
 * built app migrates at start-up without a TypeScript loader.
 */
import type { Migration } from 'kysely';
import { providerFrom } from './migrate';

const modules = import.meta.glob<Migration>('/migrations/*.ts', { eager: true });

export const bundledMigrations = providerFrom(modules);
