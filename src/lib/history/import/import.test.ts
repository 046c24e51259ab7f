import { describe, expect, it } from 'vitest';
import { importMapping } from './mapping';
import { suggestMapping } from './mapping';
import { convertRows, medianInterval, readNumber } from './rows';
import { checkUploadType, sniffText } from './sniff';
import { detectDecimal, detectDelimiter, detectHeader, MAX_COLUMNS, parseTable, parseTableInSlices, TableError, tableHead } from './table';
import { FLOW_UNITS, PRESSURE_UNITS, TEMPERATURE_UNITS } from './units';

const bytes = (s: string) => new TextEncoder().encode(s);

describe('logger units to SI', () => {
	it('converts by the exact definitions', () => {
		// NIST SP 811 App. B: 1 US gallon = 3.785411784 L exactly → 10 gal/min = 37.85411784 L/min
		expect(FLOW_UNITS.gpm.toSi(10)).toBeCloseTo(37.85411784, 9);
		// 6 m³/h = 6000 L / 60 min = 100 L/min [derived]
		expect(FLOW_UNITS.m3h.toSi(6)).toBeCloseTo(100, 12);
		// psi = 6894.757293168 Pa [derived, TRADE-FACTS.md]; bar = 100 000 Pa → 100 psi = 6.894757293168 bar
		expect(PRESSURE_UNITS.psi.toSi(100)).toBeCloseTo(6.894757293168, 9);
		// kPa and MPa: SI prefixes over 1 bar = 100 kPa (EU Directive 80/181/EEC)
		expect(PRESSURE_UNITS.kpa.toSi(150)).toBeCloseTo(1.5, 12);
		expect(PRESSURE_UNITS.mpa.toSi(0.25)).toBeCloseTo(2.5, 12);
		// SI Brochure: °C = (°F − 32) × 5/9 → 50 °F = 10 °C
		expect(TEMPERATURE_UNITS.f.toSi(50)).toBeCloseTo(10, 12);
	});
});

describe('upload checks', () => {
	it('accepts CSV by name and type, refuses other files', () => {
		expect(checkUploadType('log.csv', 'text/csv')).toBeNull();
		expect(checkUploadType('log.txt', 'text/plain')).toBeNull();
		expect(checkUploadType('log.csv', 'application/vnd.ms-excel')).toBeNull(); // Windows with Excel installed
		expect(checkUploadType('log.xlsx', 'text/csv')?.code).toBe('unsupported_type');
		expect(checkUploadType('log', 'application/pdf')?.code).toBe('unsupported_type');
	});
	it('sniffs the bytes: binary is refused, a Windows code page is read', () => {
		expect(sniffText(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 1, 2])).ok).toBe(false); // ZIP (xlsx) magic
		expect(sniffText(new Uint8Array([0x61, 0x00, 0x62])).ok).toBe(false);
		expect(sniffText(new Uint8Array()).ok).toBe(false);
		// "°C" in windows-1252 is 0xB0 0x43 — invalid as UTF-8
		const r = sniffText(new Uint8Array([0x74, 0x20, 0xb0, 0x43, 0x0a]));
		expect(r.ok && r.text).toBe('t °C\n');
		expect(r.ok && r.encoding).toBe('windows-1252');
		const bom = sniffText(bytes('\ufefftime,flow\n'));
		expect(bom.ok && bom.text).toBe('time,flow\n');
	});
});

describe('table', () => {
	it('detects the delimiter, the header and a decimal comma', () => {
		const semi =
			'Zeit;Durchfluss l/min;Druck bar\n29.03.2026 10:00:00;63,5;1,20\n29.03.2026 10:00:10;63,7;1,21\n';
		expect(detectDelimiter(semi)).toBe(';');
		const rows = parseTable(semi, ';');
		expect(detectHeader(rows)).toBe(true);
		expect(detectDecimal(rows.slice(1), ';')).toBe(',');
		expect(detectDelimiter('a\tb\tc\n1\t2\t3\n')).toBe('\t');
		expect(detectDelimiter('"x, y",b\n"1,5",2\n')).toBe(',');
		expect(detectHeader(parseTable('2026-01-01 10:00,5\n2026-01-01 10:01,6\n', ','))).toBe(false);
	});
	it('keeps the file line of every row, past blank lines and quoted line breaks', () => {
		const rows = parseTable('a,b\n\n1,"x\ny"\n2,z\n', ',');
		expect(rows.map((r) => r.line)).toEqual([1, 3, 5]);
		expect(tableHead('a,b\n1,2\n3,4\n', ',', 2).length).toBe(2);
	});
});

describe('large files', () => {
	it('read in slices give the same rows and file lines as read at once (LF and CRLF, blank lines, BOM)', async () => {
		for (const eol of ['\n', '\r\n']) {
			const lines = ['\ufefftime,flow_lpm'];
			for (let i = 0; i < 60_000; i++) lines.push(i % 997 === 0 ? '' : `2026-01-01T00:00:${String(i % 60).padStart(2, '0')}Z,${80 + (i % 7)}`);
			const text = lines.join(eol) + eol;
			expect(text.length).toBeGreaterThan(2 * 512 * 1024); // several slices
			let pauses = 0;
			const sliced = await parseTableInSlices(text, ',', async () => void pauses++);
			expect(pauses).toBeGreaterThan(1);
			expect(sliced).toEqual(parseTable(text, ','));
		}
	});

	it('refuses a row of more columns than any logger writes (a wrong delimiter, or not a table)', () => {
		const wide = `${'x,'.repeat(MAX_COLUMNS)}x\n1,2\n`;
		expect(() => parseTable(wide, ',')).toThrow(TableError);
		expect(() => parseTable(wide, ',')).toThrow(/line 1 has 257 columns/);
	});
});

describe('readNumber', () => {
	it('reads both decimal separators and refuses mixtures', () => {
		expect(readNumber('63.5', '.')).toBe(63.5);
		expect(readNumber('63,5', ',')).toBe(63.5);
		expect(readNumber('1 234,5', ',')).toBe(1234.5);
		expect(readNumber('', '.')).toBeNull();
		expect(readNumber('NaN', '.')).toBeNull();
		expect(readNumber('63,5', '.')).toBe('bad');
		expect(readNumber('1.234,5', ',')).toBe('bad');
		expect(readNumber('12a', '.')).toBe('bad');
		expect(readNumber('-1e3', '.')).toBe(-1000);
	});
});

describe('suggestMapping + convertRows', () => {
	it('maps an Aftwater export back to itself', () => {
		const csv =
			'time (UTC),flow (L/min),supply pressure (bar),water temperature (°C),shaft speed (rpm)\n2026-01-01T00:00:00.000Z,63.5,1.2,,110\n2026-01-01T00:00:01.000Z,63.25,1.21,14.5,110\n';
		const rows = parseTable(csv, detectDelimiter(csv));
		const { mapping } = suggestMapping(rows, ',', 'Europe/Oslo');
		expect(mapping).toMatchObject({
			header: true,
			time: { column: 0, format: 'iso' },
			flow: { column: 1, unit: 'lpm' },
			pressure: { column: 2, unit: 'bar' },
			temperature: { column: 3, unit: 'c' },
			rpm: { column: 4 }
		});
		const out = convertRows(rows, mapping!);
		expect(out.problems).toEqual([]);
		expect(out.samples).toEqual([
			{
				line: 2,
				ts: Date.UTC(2026, 0, 1),
				flow_lpm: 63.5,
				supply_bar: 1.2,
				temp_c: null,
				shaft_rpm: 110
			},
			{
				line: 3,
				ts: Date.UTC(2026, 0, 1, 0, 0, 1),
				flow_lpm: 63.25,
				supply_bar: 1.21,
				temp_c: 14.5,
				shaft_rpm: 110
			}
		]);
	});

	it('converts US units and reports bad rows by line', () => {
		const csv = [
			'Date,Time,Flow gpm,Pressure psi,Temp F',
			'03/08/2026,1:00:00 AM,20,14.5,50',
			'03/08/2026,2:30:00 AM,20,14.5,50', // skipped by the clocks in Chicago
			'03/08/2026,3:00:00 AM,,14.5,50', // no flow
			'03/08/2026,3:00:10 AM,2O,14.5,50', // letter O for a zero
			'03/08/2026,not a time,20,14.5,50',
			'03/08/2026,3:00:20 AM,20,abc,50'
		].join('\n');
		const rows = parseTable(csv, ',');
		const { mapping } = suggestMapping(rows, ',', 'America/Chicago');
		expect(mapping).toMatchObject({
			time: { column: 1, date_column: 0, format: 'mdy' },
			flow: { unit: 'gpm' },
			pressure: { unit: 'psi' },
			temperature: { unit: 'f' }
		});
		const out = convertRows(rows, mapping!);
		expect(out.total).toBe(6);
		expect(out.samples).toHaveLength(1);
		// 1:00 AM CST (UTC−6) = 07:00 UTC; 20 gal/min × 3.785411784 = 75.70823568 L/min; 50 °F = 10 °C
		expect(out.samples[0].ts).toBe(Date.UTC(2026, 2, 8, 7));
		expect(out.samples[0].flow_lpm).toBeCloseTo(75.70823568, 9);
		expect(out.samples[0].temp_c).toBeCloseTo(10, 12);
		expect(out.problems.map((p) => [p.line, p.kind])).toEqual([
			[3, 'nonexistent_time'],
			[4, 'missing_flow'],
			[5, 'unreadable_number'],
			[6, 'unreadable_time'],
			[7, 'unreadable_number']
		]);
	});

	it('validates a mapping: an unknown zone is refused', () => {
		const r = importMapping.safeParse({
			delimiter: ',',
			header: true,
			decimal: '.',
			time: { column: 0, format: 'iso', zone: 'Atlantis/Central' },
			flow: { column: 1, unit: 'lpm' }
		});
		expect(r.success).toBe(false);
	});

	it('medianInterval', () => {
		// gaps 10, 10, 60 s → median 10 s
		expect(medianInterval([{ ts: 0 }, { ts: 10_000 }, { ts: 20_000 }, { ts: 80_000 }])).toBe(
			10_000
		);
		expect(medianInterval([{ ts: 5 }])).toBeNull();
	});
});

describe('parseTable line numbers', () => {
	it('are the same with and without quotes (fast and slow paths), for each kind of line end', () => {
		for (const eol of ['\r\n', '\n', '\r']) {
			// a blank line and a whitespace-only line between the rows
			const plain = ['a;b', '', '1;2', '   ', '3;4', ''].join(eol);
			const quoted = plain.replace('a;b', 'a;"b"');
			const lines = (t: string) => parseTable(t, ';').map((r) => [r.line, r.cells.join('|')]);
			expect(lines(plain)).toEqual([
				[1, 'a|b'],
				[3, '1|2'],
				[5, '3|4']
			]);
			expect(lines(quoted)).toEqual(lines(plain));
		}
	});
});
