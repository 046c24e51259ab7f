/** Field delimiters a logger file may use; apart from table.ts so a page can list them without loading the CSV parser. */
export const DELIMITERS = [',', ';', '\t'] as const;
export type Delimiter = (typeof DELIMITERS)[number];

export const DELIMITER_LABELS: Record<Delimiter, string> = {
	',': 'comma',
	';': 'semicolon',
	'\t': 'tab'
};

/** One row of a logger table: the file line it starts on (from 1) and its cells. */
export interface TableRow {
	line: number;
	cells: string[];
}
