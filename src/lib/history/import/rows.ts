/**
 * Rows of a logger table → telemetry in SI units, with a reason for every
 * row that does not read. The contract's own limits (negative flow, a time
 * in the future, …) are checked afterwards on the server by the same schema
 * the ingest uses, so an imported row passes exactly the checks a live one does.
 */
import type { ImportMapping } from './mapping';
import type { TableRow } from './table';
import { TimeReader } from './times';
import { FLOW_UNITS, PRESSURE_UNITS, TEMPERATURE_UNITS } from './units';

export interface LoggerSample {
	line: number;
	ts: number;
	flow_lpm: number;
	supply_bar: number | null;
	temp_c: number | null;
	shaft_rpm: number | null;
}

export interface RowProblem {
	line: number;
	/** kind, for counting: unreadable_time, unreadable_number, missing_flow, nonexistent_time, out_of_range, future, duplicate_in_file */
	kind: string;
	message: string;
}

export interface ConvertedRows {
	samples: LoggerSample[];
	problems: RowProblem[];
	/** rows read (the header row not counted) */
	total: number;
	/** naive times that happened twice (clocks went back) and were taken as the first */
	ambiguous: number;
	/** rows whose time carried its own offset */
	with_offset: number;
}

/** A number as a logger writes it, with '.' or ',' as the decimal separator; null when empty. */
export function readNumber(text: string | undefined, decimal: '.' | ','): number | null | 'bad' {
	const s = (text ?? '').trim().replace(/[\s\u00a0\u202f]/g, '');
	if (s === '' || /^(nan|null|n\/a|-{1,2})$/i.test(s)) return null;
	const normal = decimal === ',' ? s.replace(',', '.') : s;
	if (decimal === ',' && s.includes('.')) return 'bad';
	if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(normal)) return 'bad';
	const n = Number(normal);
	return Number.isFinite(n) ? n : 'bad';
}

export function convertRows(rows: TableRow[], mapping: ImportMapping): ConvertedRows {
	const converter = new RowConverter(mapping);
	converter.add(mapping.header ? rows.slice(1) : rows);
	return converter.result();
}

/**
 * convertRows, a slice of rows at a time (the header row already left out), so a large file can
 * be read with pauses between slices; the time reader and the counts carry across slices.
 */
export class RowConverter {
	readonly #mapping: ImportMapping;
	readonly #reader: TimeReader;
	readonly #samples: LoggerSample[] = [];
	readonly #problems: RowProblem[] = [];
	#total = 0;
	#ambiguous = 0;
	#withOffset = 0;

	constructor(mapping: ImportMapping) {
		this.#mapping = mapping;
		this.#reader = new TimeReader(mapping.time.format, mapping.time.zone);
	}

	add(data: TableRow[]): void {
		const mapping = this.#mapping;
		const reader = this.#reader;
		const samples = this.#samples;
		const problems = this.#problems;
		const flowUnit = FLOW_UNITS[mapping.flow.unit];
		const pressureUnit = mapping.pressure ? PRESSURE_UNITS[mapping.pressure.unit] : null;
		const tempUnit = mapping.temperature ? TEMPERATURE_UNITS[mapping.temperature.unit] : null;
		this.#total += data.length;
		for (const row of data) {
			const cell = (i: number) => row.cells[i];
			const timeText =
				mapping.time.date_column !== null
					? `${cell(mapping.time.date_column) ?? ''} ${cell(mapping.time.column) ?? ''}`
					: (cell(mapping.time.column) ?? '');
			const time = reader.read(timeText);
			if (!time.ok) {
				problems.push({
					line: row.line,
					kind: time.message.includes('does not exist') ? 'nonexistent_time' : 'unreadable_time',
					message: time.message
				});
				continue;
			}
			const flow = readNumber(cell(mapping.flow.column), mapping.decimal);
			if (flow === null) {
				problems.push({ line: row.line, kind: 'missing_flow', message: 'no flow value' });
				continue;
			}
			if (flow === 'bad') {
				problems.push({
					line: row.line,
					kind: 'unreadable_number',
					message: `flow “${cell(mapping.flow.column)}” is not a number`
				});
				continue;
			}
			const optional = (
				col: { column: number } | null,
				name: string,
				toSi: (v: number) => number
			) => {
				if (!col) return null;
				const v = readNumber(cell(col.column), mapping.decimal);
				if (v === 'bad') {
					problems.push({
						line: row.line,
						kind: 'unreadable_number',
						message: `${name} “${cell(col.column)}” is not a number`
					});
					return 'bad' as const;
				}
				return v === null ? null : toSi(v);
			};
			const supply = optional(mapping.pressure, 'pressure', pressureUnit?.toSi ?? ((v) => v));
			const temp = optional(mapping.temperature, 'temperature', tempUnit?.toSi ?? ((v) => v));
			const rpm = optional(mapping.rpm, 'shaft speed', (v) => v);
			if (supply === 'bad' || temp === 'bad' || rpm === 'bad') continue;
			if (time.ambiguous) this.#ambiguous++;
			if (time.offsetGiven) this.#withOffset++;
			samples.push({
				line: row.line,
				ts: time.ts,
				flow_lpm: flowUnit.toSi(flow),
				supply_bar: supply,
				temp_c: temp,
				shaft_rpm: rpm
			});
		}
	}

	result(): ConvertedRows {
		return {
			samples: this.#samples,
			problems: this.#problems,
			total: this.#total,
			ambiguous: this.#ambiguous,
			with_offset: this.#withOffset
		};
	}
}

/** Median time between consecutive samples, ms (null with fewer than two). */
export function medianInterval(samples: { ts: number }[]): number | null {
	if (samples.length < 2) return null;
	const ts = samples.map((s) => s.ts).sort((a, b) => a - b);
	const gaps: number[] = [];
	for (let i = 1; i < ts.length; i++) if (ts[i] > ts[i - 1]) gaps.push(ts[i] - ts[i - 1]);
	if (!gaps.length) return null;
	gaps.sort((a, b) => a - b);
	return gaps[Math.floor(gaps.length / 2)];
}
