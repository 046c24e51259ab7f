/**
 * The column mapping of a logger file: which column holds the time (and in
 * what format and zone), which the flow, pressure, temperature and shaft
 * speed, in which units, and what to do with rows that do not read. One
 * schema for the API and the form; the server suggests a first mapping from
 * the headers and the first rows.
 */
import { z } from 'zod';
import { DELIMITERS, detectDecimal, detectHeader, type Delimiter, type TableRow } from './table';
import { detectTimeFormat, isValidZone, TIME_FORMATS } from './times';
import {
	FLOW_UNIT_KEYS,
	flowUnitFromHeader,
	PRESSURE_UNIT_KEYS,
	pressureUnitFromHeader,
	TEMPERATURE_UNIT_KEYS,
	temperatureUnitFromHeader
} from './units';

const column = z.number({ error: 'choose a column' }).int().min(0).max(999);

export const importMapping = z.object({
	delimiter: z.enum(DELIMITERS),
	header: z.boolean(),
	decimal: z.enum(['.', ',']),
	time: z.object({
		column,
		/** a separate date column, when the logger writes date and time apart */
		date_column: column.nullable().default(null),
		format: z.enum(TIME_FORMATS),
		zone: z.string().refine(isValidZone, 'an IANA time zone such as Europe/Oslo or UTC')
	}),
	flow: z.object({ column, unit: z.enum(FLOW_UNIT_KEYS) }),
	pressure: z
		.object({ column, unit: z.enum(PRESSURE_UNIT_KEYS) })
		.nullable()
		.default(null),
	temperature: z
		.object({ column, unit: z.enum(TEMPERATURE_UNIT_KEYS) })
		.nullable()
		.default(null),
	rpm: z.object({ column }).nullable().default(null),
	/** skip: import the good rows and report the bad; reject: import nothing if any row is bad */
	bad_rows: z.enum(['skip', 'reject']).default('skip')
});
export type ImportMapping = z.output<typeof importMapping>;
export type ImportMappingInput = z.input<typeof importMapping>;

export interface MappingSuggestion {
	mapping: ImportMapping | null;
	/** what the uploader should check before importing */
	notes: string[];
}

const find = (headers: string[], test: (h: string) => boolean, taken: Set<number>) => {
	const i = headers.findIndex((h, idx) => !taken.has(idx) && test(h.toLowerCase()));
	if (i >= 0) taken.add(i);
	return i >= 0 ? i : null;
};

/** A first mapping from the header names and the first rows; the uploader confirms or changes it. */
export function suggestMapping(
	rows: TableRow[],
	delimiter: Delimiter,
	defaultZone: string
): MappingSuggestion {
	const notes: string[] = [];
	const header = detectHeader(rows);
	const width = Math.max(0, ...rows.map((r) => r.cells.length));
	const headers = header
		? rows[0].cells
		: Array.from({ length: width }, (_, i) => `column ${i + 1}`);
	const data = header ? rows.slice(1) : rows;
	const taken = new Set<number>();

	let timeCol = find(headers, (h) => /time|zeit|timestamp|datetime|^ts\b|utc/.test(h), taken);
	let dateCol: number | null = null;
	if (timeCol !== null) {
		const dateIdx = headers.findIndex(
			(h, i) => i !== timeCol && !taken.has(i) && /^date|datum/.test(h.toLowerCase())
		);
		if (
			dateIdx >= 0 &&
			detectTimeFormat(data.slice(0, 20).map((r) => r.cells[timeCol!] ?? '')) === null
		) {
			dateCol = dateIdx;
			taken.add(dateIdx);
		}
	} else {
		timeCol = find(headers, (h) => /date/.test(h), taken);
	}
	if (timeCol === null) {
		// no header names it: the first column whose values read as times
		for (let i = 0; i < width && timeCol === null; i++) {
			if (detectTimeFormat(data.slice(0, 20).map((r) => r.cells[i] ?? ''))) timeCol = i;
		}
		if (timeCol !== null) taken.add(timeCol);
	}
	const flowCol = find(headers, (h) => /flow|durchfluss|débit|lpm|gpm|m3\/h|m³\/h/.test(h), taken);
	const pressureCol = find(headers, (h) => /press|supply|druck|bar\b|psi|kpa|mpa/.test(h), taken);
	const tempCol = find(headers, (h) => /temp|°c|°f/.test(h), taken);
	const rpmCol = find(headers, (h) => /rpm|speed|shaft\s*speed|drehzahl|rev/.test(h), taken);

	if (timeCol === null || flowCol === null) {
		if (timeCol === null) notes.push('No column reads as a time: choose the time column.');
		if (flowCol === null) notes.push('No column is named as a flow: choose the flow column.');
		return { mapping: null, notes };
	}
	const timeValues = data
		.slice(0, 50)
		.map((r) =>
			dateCol !== null
				? `${r.cells[dateCol] ?? ''} ${r.cells[timeCol!] ?? ''}`
				: (r.cells[timeCol!] ?? '')
		);
	const detected = detectTimeFormat(timeValues);
	if (!detected)
		notes.push(
			`The values of “${headers[timeCol]}” do not read as times in any known format: check the time column.`
		);
	else if (detected.ambiguous)
		notes.push(
			'Every date so far has a day of 12 or less: check whether the dates are day first or month first.'
		);
	const hasOffset = timeValues.some((v) => /(Z|[+-]\d{2}:?\d{2}|UTC|GMT)\s*$/i.test(v.trim()));
	if (!hasOffset && detected && !detected.format.startsWith('epoch')) {
		notes.push(
			`The times carry no offset: they are read as wall-clock time in ${defaultZone}. Change the zone if the logger kept another clock (many keep UTC).`
		);
	}
	const flowUnit = flowUnitFromHeader(headers[flowCol]);
	if (!flowUnit)
		notes.push(`The flow header “${headers[flowCol]}” names no unit: L/min is assumed.`);
	const mapping: ImportMapping = {
		delimiter,
		header,
		decimal: detectDecimal(data, delimiter),
		time: {
			column: timeCol,
			date_column: dateCol,
			format: detected?.format ?? 'iso',
			zone: defaultZone
		},
		flow: { column: flowCol, unit: flowUnit ?? 'lpm' },
		pressure:
			pressureCol === null
				? null
				: { column: pressureCol, unit: pressureUnitFromHeader(headers[pressureCol]) ?? 'bar' },
		temperature:
			tempCol === null
				? null
				: { column: tempCol, unit: temperatureUnitFromHeader(headers[tempCol]) ?? 'c' },
		rpm: rpmCol === null ? null : { column: rpmCol },
		bad_rows: 'skip'
	};
	return { mapping, notes };
}
