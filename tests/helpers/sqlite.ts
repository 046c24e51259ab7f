/**
 * Reads of the app's SQLite file made by the test itself, beside the running server: for checks
 * of what was stored rather than of what the app answers.
 */
import type Database from 'better-sqlite3';

/** Vessel ids by vessel code (the demo fleet's ids depend on the order it was seeded in). */
export function vesselIds(db: Database.Database): Record<string, number> {
	const rows = db.prepare('select id, code from vessels').all() as { id: number; code: string }[];
	return Object.fromEntries(rows.map((v) => [v.code, v.id]));
}
