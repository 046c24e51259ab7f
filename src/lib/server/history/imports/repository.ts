/** Logger import records: rows → views (never the original bytes unless asked for). */
import type { Kysely, Selectable } from 'kysely';
import type { Database } from '../../db/schema';
import type { ImportStatus, LoggerImportsTable } from '../../db/tables/history';
import type { ImportMapping } from '$lib/history/import/mapping';
import type { ImportReport } from './analyse';

export interface ImportView {
	id: number;
	shaft_id: number;
	vessel_id: number;
	uploaded_by: string | null;
	uploaded_by_email: string;
	filename: string;
	content_type: string;
	size_bytes: number;
	sha256: string;
	status: ImportStatus;
	mapping: ImportMapping | null;
	rows_total: number;
	rows_imported: number;
	rows_duplicate: number;
	rows_skipped: number;
	report: ImportReport | null;
	error: string | null;
	created_at: number;
	imported_at: number | null;
}

const COLUMNS = [
	'id',
	'shaft_id',
	'vessel_id',
	'uploaded_by',
	'uploaded_by_email',
	'filename',
	'content_type',
	'size_bytes',
	'sha256',
	'status',
	'mapping',
	'rows_total',
	'rows_imported',
	'rows_duplicate',
	'rows_skipped',
	'report',
	'error',
	'created_at',
	'imported_at'
] as const;

type Row = Pick<Selectable<LoggerImportsTable>, (typeof COLUMNS)[number]>;

const parse = <T>(json: string | null): T | null => {
	if (json === null) return null;
	try {
		return JSON.parse(json) as T;
	} catch {
		return null;
	}
};

export function toView(r: Row): ImportView {
	return { ...r, mapping: parse<ImportMapping>(r.mapping), report: parse<ImportReport>(r.report) };
}

export async function getImport(db: Kysely<Database>, id: number): Promise<ImportView | undefined> {
	const row = await db
		.selectFrom('logger_imports')
		.select(COLUMNS)
		.where('id', '=', id)
		.executeTakeFirst();
	return row && toView(row);
}

export async function getOriginal(db: Kysely<Database>, id: number) {
	return db
		.selectFrom('logger_imports')
		.select(['filename', 'content_type', 'original'])
		.where('id', '=', id)
		.executeTakeFirst();
}

/** Newest first; the report (which holds the row problems) is left out of lists. */
export async function listImports(
	db: Kysely<Database>,
	where: { shaftId?: number; vesselId?: number },
	limit = 200
) {
	const rows = await db
		.selectFrom('logger_imports')
		.select(COLUMNS.filter((c) => c !== 'report'))
		.$if(where.shaftId !== undefined, (q) => q.where('shaft_id', '=', where.shaftId!))
		.$if(where.vesselId !== undefined, (q) => q.where('vessel_id', '=', where.vesselId!))
		.orderBy('created_at', 'desc')
		.orderBy('id', 'desc')
		.limit(limit)
		.execute();
	return rows.map((r) => toView({ ...r, report: null }));
}

export async function previousImportOf(
	db: Kysely<Database>,
	shaftId: number,
	sha256: string,
	exceptId?: number
) {
	return db
		.selectFrom('logger_imports')
		.select(['id', 'imported_at', 'uploaded_by_email'])
		.where('shaft_id', '=', shaftId)
		.where('sha256', '=', sha256)
		.where('status', '=', 'imported')
		.$if(exceptId !== undefined, (q) => q.where('id', '!=', exceptId!))
		.orderBy('imported_at', 'desc')
		.executeTakeFirst();
}
