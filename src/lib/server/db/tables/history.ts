/** Tables of the history concern (migrations/20261201_0006_history.ts). */
import type { Generated } from 'kysely';

export type ImportStatus = 'previewed' | 'importing' | 'imported' | 'failed';

export interface LoggerImportsTable {
	id: Generated<number>;
	shaft_id: number;
	vessel_id: number;
	/** user id; null once the account is deleted */
	uploaded_by: string | null;
	uploaded_by_email: string;
	filename: string;
	content_type: string;
	size_bytes: number;
	/** hex SHA-256 of the original, to recognise the same file uploaded again */
	sha256: string;
	/** the file as uploaded */
	original: Buffer;
	/** JSON of the importMapping schema ($lib/history/import/mapping) */
	mapping: string | null;
	status: Generated<ImportStatus>;
	rows_total: Generated<number>;
	rows_imported: Generated<number>;
	rows_duplicate: Generated<number>;
	rows_skipped: Generated<number>;
	/** JSON: ImportReport (src/lib/server/history/imports.ts), problems bounded */
	report: string | null;
	error: string | null;
	created_at: number;
	imported_at: number | null;
}

export interface HistoryTables {
	logger_imports: LoggerImportsTable;
}
