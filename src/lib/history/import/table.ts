/**
 * A logger file as a table of text cells, parsed by csv-parse (quotes,
 * embedded delimiters and line breaks handled there, not here). Loggers in
 * countries with a decimal comma write ';' between fields; some write tabs.
 */
import { parse, type Options } from 'csv-parse/sync';

import { DELIMITERS, type Delimiter, type TableRow } from './delimiters';

export { DELIMITERS, DELIMITER_LABELS, type Delimiter, type TableRow } from './delimiters';

/** A file csv-parse cannot split into records (a quote never closed, say), with its reason. */
export class TableError extends Error {}

function parseOrExplain(text: string, options: Options): unknown {
	try {
		return parse(text, options);
	} catch (err) {
		throw new TableError(`the file cannot be read as a table: ${err instanceof Error ? err.message : String(err)}`);
	}
}

function widthChecked(cells: string[], line: number): string[] {
	if (cells.length > MAX_COLUMNS)
		throw new TableError(`line ${line} has ${cells.length} columns, more than the ${MAX_COLUMNS} a logger file may have: is the delimiter right?`);
	return cells;
}

export function parseTable(
	text: string,
	delimiter: Delimiter,
	options: { toLine?: number } = {}
): TableRow[] {
	// one line ending for the file, the first kind found (as csv-parse itself decides)
	const eol = text.includes('\r\n') ? '\r\n' : text.includes('\n') ? '\n' : '\r';
	const common = {
		delimiter,
		record_delimiter: eol,
		bom: true,
		relax_column_count: true,
		relax_quotes: true,
		skip_empty_lines: true,
		trim: true,
		...(options.toLine ? { to_line: options.toLine } : {})
	};
	// Without quotes a record is a line, so the lines can be counted here: csv-parse's
	// per-record info (the slow path) costs it almost three times the parse.
	if (!text.includes('"')) {
		const records = parseOrExplain(text, common) as string[][];
		const lines = nonEmptyLines(text, eol);
		const out: TableRow[] = [];
		for (let i = 0; i < records.length; i++) {
			if (records[i].some((c) => c !== '')) out.push({ line: lines[i], cells: widthChecked(records[i], lines[i]) });
		}
		return out;
	}
	const records = parseOrExplain(text, { ...common, info: true }) as {
		record: string[];
		info: { lines: number; empty_lines: number };
	}[];
	// info.lines is where a record ends; it starts after the previous one and the blank lines between
	const out: TableRow[] = [];
	let prevEnd = 0;
	let prevEmpty = 0;
	for (const r of records) {
		const line = prevEnd + 1 + (r.info.empty_lines - prevEmpty);
		prevEnd = r.info.lines;
		prevEmpty = r.info.empty_lines;
		if (r.record.some((c) => c !== '')) out.push({ line, cells: widthChecked(r.record, line) });
	}
	return out;
}

/** Cells a row may have: far more than any logger writes, few enough that a preview stays small. */
export const MAX_COLUMNS = 256;

/** bytes of text parsed between pauses: a slice takes a few tens of milliseconds */
const SLICE_BYTES = 512 * 1024;

/**
 * parseTable for a large file without holding up the server: a file without quotes (a record is
 * a line) is parsed a slice of lines at a time, with `pause()` between slices; a file with quotes
 * (a cell may span lines) is parsed at once. The rows are the same either way.
 */
export async function parseTableInSlices(text: string, delimiter: Delimiter, pause: () => Promise<void>): Promise<TableRow[]> {
	if (text.includes('"') || text.length <= SLICE_BYTES) return parseTable(text, delimiter);
	const eol = text.includes('\r\n') ? '\r\n' : text.includes('\n') ? '\n' : '\r';
	const out: TableRow[] = [];
	let start = 0;
	let linesBefore = 0;
	while (start < text.length) {
		let end = text.indexOf(eol, Math.min(start + SLICE_BYTES, text.length));
		end = end < 0 ? text.length : end + eol.length;
		const slice = text.slice(start, end);
		// each slice ends just after a line ending, so its line 1 follows the lines before it
		for (const row of parseTable(slice, delimiter)) out.push({ line: row.line + linesBefore, cells: row.cells });
		linesBefore += countOf(slice, eol);
		start = end;
		if (start < text.length) await pause();
	}
	return out;
}

function countOf(text: string, needle: string): number {
	let n = 0;
	for (let i = text.indexOf(needle); i >= 0; i = text.indexOf(needle, i + needle.length)) n++;
	return n;
}

/** Numbers (from 1) of the lines with something on them (csv-parse, trimming, skips blank ones). */
function nonEmptyLines(text: string, eol: string): number[] {
	const out: number[] = [];
	let line = 1;
	let start = 0;
	for (;;) {
		const end = text.indexOf(eol, start);
		const stop = end < 0 ? text.length : end;
		if (stop > start && /\S/.test(text.slice(start, stop))) out.push(line);
		if (end < 0) return out;
		line++;
		start = end + eol.length;
	}
}

/** The first lines of the file, for guessing; a cut line at the end is dropped by the caller's to_line. */
function head(text: string, lines: number): string {
	let end = 0;
	for (let i = 0; i < lines && end >= 0; i++) end = text.indexOf('\n', end + 1);
	return end < 0 ? text : text.slice(0, end);
}

/**
 * The delimiter that splits the first rows into the same number (> 1) of
 * cells most consistently; ties go in the order comma, semicolon, tab.
 */
export function detectDelimiter(text: string): Delimiter {
	const sample = head(text, 30);
	let best: Delimiter = ',';
	let bestScore = -Infinity;
	for (const d of DELIMITERS) {
		let rows: TableRow[];
		try {
			rows = parseTable(sample, d);
		} catch {
			continue;
		}
		if (rows.length === 0) continue;
		const counts = rows.map((r) => r.cells.length);
		const mode = [...new Set(counts)].sort(
			(a, b) => counts.filter((c) => c === b).length - counts.filter((c) => c === a).length
		)[0];
		if (mode < 2) continue;
		const agree = counts.filter((c) => c === mode).length / counts.length;
		const score = agree * 10 + Math.min(mode, 10) / 10;
		if (score > bestScore) {
			bestScore = score;
			best = d;
		}
	}
	return best;
}

const NUMBERISH = /^[+-]?(\d[\d\s]*([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?$/;
const TIMEISH = /^\d{1,4}[-/.]\d{1,2}[-/.]\d{1,4}|^\d{1,2}:\d{2}/;

const isData = (cell: string) => NUMBERISH.test(cell) || TIMEISH.test(cell);

/** A first row with fewer number- or time-like cells than the second is a header row. */
export function detectHeader(rows: TableRow[]): boolean {
	if (rows.length < 2) return rows.length === 1 && !rows[0].cells.some(isData);
	const dataLike = (r: TableRow) => r.cells.filter(isData).length;
	return dataLike(rows[0]) < dataLike(rows[1]);
}

/** A comma decimal separator when the numbers of the first rows use one and none uses a point. */
export function detectDecimal(rows: TableRow[], delimiter: Delimiter): '.' | ',' {
	if (delimiter === ',') return '.';
	let comma = 0;
	let point = 0;
	for (const r of rows.slice(0, 30)) {
		for (const c of r.cells) {
			if (/^[+-]?\d+,\d+$/.test(c)) comma++;
			else if (/^[+-]?\d+\.\d+$/.test(c)) point++;
		}
	}
	return comma > 0 && point === 0 ? ',' : '.';
}

/** The first `lines` lines of a file as a table, for the mapping step. */
export function tableHead(text: string, delimiter: Delimiter, lines = 40): TableRow[] {
	try {
		return parseTable(head(text, lines), delimiter);
	} catch {
		// the cut fell inside a quoted cell that spans lines: let csv-parse find the end itself
		return parseTable(text, delimiter, { toLine: lines });
	}
}
