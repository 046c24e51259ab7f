/** What an import of a logger file does (or would do), row by row: the answer of preview and commit. */
import type { ImportMapping } from './mapping';
import type { LoggerSample, RowProblem } from './rows';

export interface PreviewRow extends LoggerSample {
	status: 'new' | 'stored' | 'duplicate_in_file';
}

export interface ImportReport {
	mapping: ImportMapping;
	rows_total: number;
	/** rows that read and pass the contract */
	rows_valid: number;
	rows_bad: number;
	rows_duplicate_in_file: number;
	rows_already_stored: number;
	rows_new: number;
	problems: RowProblem[];
	problems_total: number;
	problems_by_kind: Record<string, number>;
	first_rows: PreviewRow[];
	span: { from: number; to: number } | null;
	median_interval_s: number | null;
	ambiguous_times: number;
	notes: string[];
	/** after a commit */
	rows_imported?: number;
	rows_rejected_by_ingest?: number;
}
