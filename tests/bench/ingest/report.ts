/** The bench's readable output: fixed-width tables. */

export interface Column<T> {
	head: string;
	get: (row: T) => string | number | null | undefined;
	/** digits after the point for numbers */
	digits?: number;
}

function cell(v: string | number | null | undefined, digits = 0): string {
	if (v === null || v === undefined || (typeof v === 'number' && Number.isNaN(v))) return '–';
	if (typeof v === 'number') {
		return v
			.toLocaleString('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits })
			.replace(/,/g, ' ');
	}
	return v;
}

export function table<T>(rows: T[], columns: Column<T>[]): string {
	const cells = rows.map((r) => columns.map((c) => cell(c.get(r), c.digits)));
	const widths = columns.map((c, i) =>
		Math.max(c.head.length, ...cells.map((row) => row[i].length))
	);
	const line = (values: string[]) =>
		values.map((v, i) => (i === 0 ? v.padEnd(widths[i]) : v.padStart(widths[i]))).join('  ');
	return [
		line(columns.map((c) => c.head)),
		widths.map((w) => '─'.repeat(w)).join('  '),
		...cells.map(line)
	].join('\n');
}
