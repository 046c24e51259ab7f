/**
 * Is an uploaded file a text table at all? A browser's content type comes
 * from the file name, so a renamed spreadsheet or PDF arrives as "text/csv":
 * the bytes decide. Loggers write UTF-8 (often with a byte-order mark) or a
 * Windows code page (the ° of "°C" is then byte 0xB0), so both are read.
 */

export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024; // 20 MiB: a year of 1-minute logger rows is ~30 MB raw, so loggers split by month

const ACCEPTED_TYPES = ['text/csv', 'text/plain', 'application/csv', 'text/comma-separated-values'];
/** Windows reports .csv files as an Excel type when Excel is installed; the name and the bytes still decide. */
const CSV_NAME_TYPES = ['application/vnd.ms-excel', 'application/octet-stream', ''];
const ACCEPTED_EXTENSIONS = ['.csv', '.txt', '.tsv'];

export type SniffFailure = {
	ok: false;
	code: 'unsupported_type' | 'not_text' | 'empty';
	message: string;
};
export type SniffResult =
	{ ok: true; text: string; encoding: 'utf-8' | 'windows-1252' } | SniffFailure;

/** Checks the name and declared type of an upload before its bytes are read. */
export function checkUploadType(filename: string, contentType: string): SniffFailure | null {
	const name = filename.toLowerCase();
	const dot = name.lastIndexOf('.');
	const ext = dot >= 0 ? name.slice(dot) : '';
	const type = contentType.split(';')[0].trim().toLowerCase();
	const extOk = ACCEPTED_EXTENSIONS.includes(ext);
	if (ext && !extOk) {
		return {
			ok: false,
			code: 'unsupported_type',
			message: `“${filename}” is not a CSV file: upload a .csv or .txt file (export spreadsheets as CSV first)`
		};
	}
	if (ACCEPTED_TYPES.includes(type) || (extOk && CSV_NAME_TYPES.includes(type))) return null;
	return {
		ok: false,
		code: 'unsupported_type',
		message: `files of type ${type || 'unknown'} are not accepted: upload a CSV file (text/csv or text/plain)`
	};
}

const MAGIC: [string, number[]][] = [
	['a ZIP archive (an .xlsx spreadsheet?)', [0x50, 0x4b, 0x03, 0x04]],
	['a PDF document', [0x25, 0x50, 0x44, 0x46]],
	['an old Excel or Word file', [0xd0, 0xcf, 0x11, 0xe0]],
	['a gzip archive', [0x1f, 0x8b]],
	['a PNG image', [0x89, 0x50, 0x4e, 0x47]],
	['a JPEG image', [0xff, 0xd8, 0xff]]
];

/** Decodes an upload as text, or says why it is not text. */
export function sniffText(bytes: Uint8Array): SniffResult {
	if (bytes.length === 0) return { ok: false, code: 'empty', message: 'the file is empty' };
	for (const [what, magic] of MAGIC) {
		if (magic.every((b, i) => bytes[i] === b))
			return { ok: false, code: 'not_text', message: `the file is ${what}, not a CSV text file` };
	}
	let control = 0;
	const probe = Math.min(bytes.length, 65_536);
	for (let i = 0; i < probe; i++) {
		const b = bytes[i];
		if (b === 0)
			return {
				ok: false,
				code: 'not_text',
				message: 'the file contains NUL bytes: it is binary (or UTF-16), not a CSV text file'
			};
		if (b < 0x20 && b !== 0x09 && b !== 0x0a && b !== 0x0d && b !== 0x0c) control++;
	}
	if (control > probe / 100)
		return {
			ok: false,
			code: 'not_text',
			message: 'the file contains control characters: it is not a CSV text file'
		};
	try {
		return {
			ok: true,
			text: new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes),
			encoding: 'utf-8'
		};
	} catch {
		return {
			ok: true,
			text: new TextDecoder('windows-1252').decode(bytes),
			encoding: 'windows-1252'
		};
	}
}
