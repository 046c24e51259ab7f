/**
 * What importing a logger file with a mapping would do, row by row: which
 * rows do not read, which fail the telemetry contract (the same schema live
 * messages pass), which repeat a time within the file, which are stored
 * already, and which are new. The preview shows this; the commit imports
 * exactly the new rows.
 */
import type { Kysely } from 'kysely';
import type { ImportMapping } from '$lib/history/import/mapping';
import {
	medianInterval,
	RowConverter,
	type LoggerSample,
	type RowProblem
} from '$lib/history/import/rows';
import type { ImportReport, PreviewRow } from '$lib/history/import/report';
import { parseTableInSlices } from '$lib/history/import/table';
import type { Database } from '../../db/schema';
import { telemetryPayload } from '../../ingest/payloads';

export type { ImportReport, PreviewRow };

/** Problems kept in a report; the counts by kind are complete. */
export const MAX_PROBLEMS = 200;
const PREVIEW_ROWS = 20;
/** SQLite takes up to 32 766 parameters a statement; 5 000 keeps each lookup short */
const LOOKUP_CHUNK = 5_000;
/** rows converted and checked between pauses: a large file must not hold up live ingest and alarms */
const ROWS_PER_SLICE = 20_000;
const pause = () => new Promise<void>((resolve) => setImmediate(resolve));

export interface Analysis {
	report: ImportReport;
	/** the rows a commit sends through the ingest pipeline */
	fresh: LoggerSample[];
}

/** The times of `ts` already stored for the shaft. */
export async function storedTimes(
	db: Kysely<Database>,
	shaftId: number,
	ts: number[]
): Promise<Set<number>> {
	const found = new Set<number>();
	for (let i = 0; i < ts.length; i += LOOKUP_CHUNK) {
		const chunk = ts.slice(i, i + LOOKUP_CHUNK);
		const rows = await db
			.selectFrom('samples')
			.select('ts')
			.where('shaft_id', '=', shaftId)
			.where('ts', 'in', chunk)
			.execute();
		for (const r of rows) found.add(r.ts);
	}
	return found;
}

const formatSeconds = (s: number) =>
	s >= 120 ? `${Math.round(s / 60)} min` : `${Math.round(s)} s`;

export async function analyse(
	db: Kysely<Database>,
	input: {
		shaftId: number;
		text: string;
		mapping: ImportMapping;
		gapMs: number;
		now: number;
		maxFutureSkewS: number;
	}
): Promise<Analysis> {
	const { mapping } = input;
	const table = await parseTableInSlices(input.text, mapping.delimiter, pause);
	const converter = new RowConverter(mapping);
	const data = mapping.header ? table.slice(1) : table;
	for (let i = 0; i < data.length; i += ROWS_PER_SLICE) {
		converter.add(data.slice(i, i + ROWS_PER_SLICE));
		await pause();
	}
	const converted = converter.result();
	const problems: RowProblem[] = [...converted.problems];
	const byKind: Record<string, number> = {};
	const latest = input.now + input.maxFutureSkewS * 1000;

	const valid: LoggerSample[] = [];
	let checked = 0;
	for (const s of converted.samples) {
		if (++checked % ROWS_PER_SLICE === 0) await pause();
		const check = telemetryPayload.safeParse({
			ts: s.ts,
			flow_lpm: s.flow_lpm,
			supply_bar: s.supply_bar,
			temp_c: s.temp_c,
			shaft_rpm: s.shaft_rpm
		});
		if (!check.success) {
			const issue = check.error.issues[0];
			problems.push({
				line: s.line,
				kind: 'out_of_range',
				message: `${issue.path.join('.') || 'row'}: ${issue.message}`
			});
			continue;
		}
		if (s.ts > latest) {
			problems.push({
				line: s.line,
				kind: 'future',
				message: `${new Date(s.ts).toISOString()} is in the future: check the time zone`
			});
			continue;
		}
		valid.push(s);
	}
	const seen = new Set<number>();
	const unique: LoggerSample[] = [];
	const dupInFile: LoggerSample[] = [];
	for (const s of valid) {
		if (seen.has(s.ts)) dupInFile.push(s);
		else {
			seen.add(s.ts);
			unique.push(s);
		}
	}
	for (const s of dupInFile) {
		problems.push({
			line: s.line,
			kind: 'duplicate_in_file',
			message: `${new Date(s.ts).toISOString()} appears earlier in the file; this row is skipped`
		});
	}
	const stored = await storedTimes(
		db,
		input.shaftId,
		unique.map((s) => s.ts)
	);
	const fresh = unique.filter((s) => !stored.has(s.ts));

	problems.sort((a, b) => a.line - b.line);
	for (const p of problems) byKind[p.kind] = (byKind[p.kind] ?? 0) + 1;
	const dupLines = new Set(dupInFile.map((s) => s.line));
	const firstRows: PreviewRow[] = valid.slice(0, PREVIEW_ROWS).map((s) => ({
		...s,
		status: dupLines.has(s.line) ? 'duplicate_in_file' : stored.has(s.ts) ? 'stored' : 'new'
	}));

	let from = Infinity;
	let to = -Infinity;
	for (const s of unique) {
		if (s.ts < from) from = s.ts;
		if (s.ts > to) to = s.ts;
	}
	const median = medianInterval(unique);
	const notes: string[] = [];
	if (median !== null && median > input.gapMs) {
		notes.push(
			`Rows are ${formatSeconds(median / 1000)} apart (median), longer than the shaft’s stale threshold of ${formatSeconds(input.gapMs / 1000)}: the time between them will count as unknown in compliance, not as compliant.`
		);
	}
	if (converted.ambiguous > 0) {
		notes.push(
			`${converted.ambiguous} wall-clock time(s) happened twice when the clocks went back; each was taken as the first.`
		);
	}
	if (mapping.bad_rows === 'reject' && problems.some((p) => p.kind !== 'duplicate_in_file')) {
		notes.push(
			'Bad rows are set to reject the file: nothing will be imported until they are fixed or set to skip.'
		);
	}
	return {
		report: {
			mapping,
			rows_total: converted.total,
			rows_valid: valid.length,
			rows_bad: converted.total - valid.length,
			rows_duplicate_in_file: dupInFile.length,
			rows_already_stored: unique.length - fresh.length,
			rows_new: fresh.length,
			problems: problems.slice(0, MAX_PROBLEMS),
			problems_total: problems.length,
			problems_by_kind: byKind,
			first_rows: firstRows,
			span: unique.length ? { from, to } : null,
			median_interval_s: median === null ? null : median / 1000,
			ambiguous_times: converted.ambiguous,
			notes
		},
		fresh
	};
}
