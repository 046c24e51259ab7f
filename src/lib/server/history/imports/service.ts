/**
 * Logger uploads: a CSV file from a vessel's data logger, for one shaft.
 * Upload (checked, kept, a mapping suggested and previewed) → preview with
 * another mapping as often as needed → commit. A commit sends the new rows
 * through the ingest pipeline, so they are validated, de-duplicated and
 * rolled up exactly like live telemetry, and compliance then includes them.
 */
import { createHash } from 'node:crypto';
import type { ImportMapping } from '$lib/history/import/mapping';
import { suggestMapping } from '$lib/history/import/mapping';
import { checkUploadType, MAX_UPLOAD_BYTES, sniffText } from '$lib/history/import/sniff';
import { detectDelimiter, tableHead, TableError, type TableRow } from '$lib/history/import/table';
import { ApiError } from '../../api/errors';
import { sizeOverLimit } from '../../api/upload';
import { audit, type Actor } from '../../audit';
import type { AppContext } from '../../context';
import type { ShaftHistory } from '../shaft-context';
import { analyse, storedTimes, type ImportReport } from './analyse';
import { getImport, getOriginal, previousImportOf, type ImportView } from './repository';

/** Uploads previewed but never imported are deleted after this long (30 days). */
const PREVIEW_KEEP_MS = 30 * 86_400_000;
/** rows handed to the pipeline between two turns of the event loop */
const INGEST_SLICE = 2_000;

export interface UploadedFile {
	name: string;
	type: string;
	bytes: Uint8Array;
}

export interface ImportTable {
	encoding: string;
	/** the first lines of the file, as cells */
	rows: TableRow[];
	delimiter: ImportMapping['delimiter'];
}

export interface ImportPreview {
	import: ImportView;
	table: ImportTable;
	/** what the uploader should check: from the suggestion and from the analysis */
	notes: string[];
	report: ImportReport | null;
}

function textOf(bytes: Uint8Array): { text: string; encoding: string } {
	const sniffed = sniffText(bytes);
	// an empty file is of the right kind, with nothing in it: 422, not 415
	if (!sniffed.ok) throw new ApiError(sniffed.code === 'empty' ? 422 : 415, sniffed.code, sniffed.message);
	return { text: sniffed.text, encoding: sniffed.encoding };
}

export function tableOf(
	bytes: Uint8Array,
	delimiter?: ImportMapping['delimiter']
): ImportTable & { text: string } {
	const { text, encoding } = textOf(bytes);
	const d = delimiter ?? detectDelimiter(text);
	try {
		return { text, encoding, delimiter: d, rows: tableHead(text, d, 30) };
	} catch (err) {
		throw explained(err);
	}
}

/** A file that cannot be split into records is the uploader's to fix: 422 with csv-parse's reason. */
const explained = (err: unknown) =>
	err instanceof TableError ? new ApiError(422, 'unreadable_file', err.message) : err;

const analyseWith = async (ctx: AppContext, h: ShaftHistory, text: string, mapping: ImportMapping) => {
	try {
		return await analyse(ctx.db, {
			shaftId: h.shaft.id,
			text,
			mapping,
			gapMs: h.gapMs,
			now: Date.now(),
			maxFutureSkewS: ctx.config.MAX_FUTURE_SKEW_S
		});
	} catch (err) {
		throw explained(err);
	}
};

async function noteRepeat(
	ctx: AppContext,
	h: ShaftHistory,
	sha256: string,
	exceptId: number
): Promise<string[]> {
	const prev = await previousImportOf(ctx.db, h.shaft.id, sha256, exceptId);
	if (!prev) return [];
	const when = prev.imported_at
		? new Date(prev.imported_at).toISOString().slice(0, 16).replace('T', ' ')
		: '';
	return [
		`The same file was imported for this shaft on ${when} UTC by ${prev.uploaded_by_email} (import ${prev.id}): its rows will show as already stored.`
	];
}

export async function createImport(
	ctx: AppContext,
	actor: Actor,
	h: ShaftHistory,
	file: UploadedFile
): Promise<ImportPreview> {
	const typeProblem = checkUploadType(file.name, file.type);
	if (typeProblem) throw new ApiError(415, typeProblem.code, typeProblem.message);
	if (file.bytes.length > MAX_UPLOAD_BYTES) {
		throw new ApiError(
			413,
			'too_large',
			`the file is ${sizeOverLimit(file.bytes.length, MAX_UPLOAD_BYTES)} — split the logger file by month`
		);
	}
	const table = tableOf(file.bytes);
	if (table.rows.length === 0) throw new ApiError(422, 'no_rows', 'the file has no rows');
	const suggestion = suggestMapping(table.rows, table.delimiter, h.vessel.time_zone);
	const sha256 = createHash('sha256').update(file.bytes).digest('hex');
	// analysed before anything is stored, so a file that cannot be read leaves nothing behind
	const report = suggestion.mapping ? (await analyseWith(ctx, h, table.text, suggestion.mapping)).report : null;
	const now = Date.now();

	await ctx.db
		.deleteFrom('logger_imports')
		.where('shaft_id', '=', h.shaft.id)
		.where('status', '=', 'previewed')
		.where('created_at', '<', now - PREVIEW_KEEP_MS)
		.execute();
	const { id } = await ctx.db
		.insertInto('logger_imports')
		.values({
			shaft_id: h.shaft.id,
			vessel_id: h.vessel.id,
			uploaded_by: actor.userId,
			uploaded_by_email: actor.name,
			filename: file.name.slice(0, 255),
			content_type: file.type || 'text/csv',
			size_bytes: file.bytes.length,
			sha256,
			original: Buffer.from(file.bytes),
			mapping: suggestion.mapping ? JSON.stringify(suggestion.mapping) : null,
			created_at: now
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	await audit(ctx.db, actor, {
		action: 'history.import_upload',
		entity: 'logger_import',
		entityId: id,
		vesselId: h.vessel.id,
		details: { shaft_id: h.shaft.id, filename: file.name, size_bytes: file.bytes.length, sha256 }
	});

	if (report) await storeReport(ctx, id, report);
	const notes = [...suggestion.notes, ...(await noteRepeat(ctx, h, sha256, id))];
	return { import: (await getImport(ctx.db, id))!, table: stripText(table), notes, report };
}

const stripText = ({ encoding, rows, delimiter }: ImportTable & { text: string }): ImportTable => ({
	encoding,
	rows,
	delimiter
});

async function storeReport(ctx: AppContext, id: number, report: ImportReport) {
	await ctx.db
		.updateTable('logger_imports')
		.set({
			mapping: JSON.stringify(report.mapping),
			report: JSON.stringify(report),
			rows_total: report.rows_total,
			rows_duplicate: report.rows_already_stored + report.rows_duplicate_in_file,
			rows_skipped: report.rows_bad
		})
		.where('id', '=', id)
		.where('status', 'in', ['previewed', 'failed'])
		.execute();
}

async function loadText(ctx: AppContext, view: ImportView) {
	const original = await getOriginal(ctx.db, view.id);
	if (!original) throw new ApiError(404, 'not_found', 'import not found');
	return textOf(original.original).text;
}

/** The file head for the mapping step, split with `delimiter` (the stored mapping's, or detected). */
export async function importTable(
	ctx: AppContext,
	view: ImportView,
	delimiter?: ImportMapping['delimiter']
): Promise<ImportTable> {
	const original = await getOriginal(ctx.db, view.id);
	if (!original) throw new ApiError(404, 'not_found', 'import not found');
	return stripText(tableOf(original.original, delimiter ?? view.mapping?.delimiter));
}

export async function previewImport(
	ctx: AppContext,
	h: ShaftHistory,
	view: ImportView,
	mapping: ImportMapping
): Promise<ImportPreview> {
	const text = await loadText(ctx, view);
	const { report } = await analyseWith(ctx, h, text, mapping);
	if (view.status === 'imported')
		return {
			import: view,
			table: await importTable(ctx, view, mapping.delimiter),
			notes: [],
			report
		};
	await storeReport(ctx, view.id, report);
	const notes = await noteRepeat(ctx, h, view.sha256, view.id);
	return {
		import: (await getImport(ctx.db, view.id))!,
		table: await importTable(ctx, view, mapping.delimiter),
		notes,
		report
	};
}

export interface CommitResult {
	outcome: 'imported' | 'rejected';
	import: ImportView;
	report: ImportReport;
}

export async function commitImport(
	ctx: AppContext,
	actor: Actor,
	h: ShaftHistory,
	view: ImportView,
	mapping: ImportMapping
): Promise<CommitResult> {
	const telemetry = ctx.services.telemetry;
	if (!telemetry)
		throw new ApiError(503, 'unavailable', 'telemetry ingest is not running; try again shortly');
	const claimed = await ctx.db
		.updateTable('logger_imports')
		.set({ status: 'importing' })
		.where('id', '=', view.id)
		.where('status', 'in', ['previewed', 'failed'])
		.executeTakeFirst();
	if (Number(claimed.numUpdatedRows) !== 1) {
		throw new ApiError(
			409,
			'conflict',
			view.status === 'imported'
				? 'this file is imported already'
				: 'this file is being imported now'
		);
	}
	try {
		const text = await loadText(ctx, view);
		const { report, fresh } = await analyseWith(ctx, h, text, mapping);
		const bad = report.problems_total - report.rows_duplicate_in_file;
		if (mapping.bad_rows === 'reject' && bad > 0) {
			await ctx.db
				.updateTable('logger_imports')
				.set({ status: 'previewed' })
				.where('id', '=', view.id)
				.execute();
			await storeReport(ctx, view.id, report);
			return { outcome: 'rejected', import: (await getImport(ctx.db, view.id))!, report };
		}

		const pipeline = telemetry.pipeline;
		for (let i = 0; i < fresh.length; i++) {
			const s = fresh[i];
			const payload: Record<string, number> = { ts: s.ts, flow_lpm: s.flow_lpm };
			if (s.supply_bar !== null) payload.supply_bar = s.supply_bar;
			if (s.temp_c !== null) payload.temp_c = s.temp_c;
			if (s.shaft_rpm !== null) payload.shaft_rpm = s.shaft_rpm;
			pipeline.handle(h.topic, Buffer.from(JSON.stringify(payload)), Date.now(), 'import');
			// let requests and live ingest through while a big file goes in
			if (i % INGEST_SLICE === INGEST_SLICE - 1) await new Promise((r) => setImmediate(r));
		}
		await pipeline.drain();
		const present = await storedTimes(
			ctx.db,
			h.shaft.id,
			fresh.map((s) => s.ts)
		);
		report.rows_imported = present.size;
		report.rows_rejected_by_ingest = fresh.length - present.size;
		const now = Date.now();
		await ctx.db
			.updateTable('logger_imports')
			.set({
				status: 'imported',
				mapping: JSON.stringify(mapping),
				report: JSON.stringify(report),
				rows_total: report.rows_total,
				rows_imported: present.size,
				rows_duplicate: report.rows_already_stored + report.rows_duplicate_in_file,
				rows_skipped: report.rows_bad + report.rows_rejected_by_ingest,
				imported_at: now,
				error: null
			})
			.where('id', '=', view.id)
			.execute();
		await audit(ctx.db, actor, {
			action: 'history.import_commit',
			entity: 'logger_import',
			entityId: view.id,
			vesselId: h.vessel.id,
			details: {
				shaft_id: h.shaft.id,
				rows_imported: present.size,
				rows_duplicate: report.rows_already_stored + report.rows_duplicate_in_file,
				rows_skipped: report.rows_bad,
				span: report.span,
				mapping
			},
			at: now
		});
		return { outcome: 'imported', import: (await getImport(ctx.db, view.id))!, report };
	} catch (err) {
		await ctx.db
			.updateTable('logger_imports')
			.set({
				status: 'failed',
				error: String(err instanceof Error ? err.message : err).slice(0, 500)
			})
			.where('id', '=', view.id)
			.execute();
		throw err;
	}
}

/**
 * At start-up: an import the server was carrying out when it stopped is
 * marked failed, so it can be imported again — rows it had already stored are
 * then skipped as duplicates, so nothing is stored twice.
 */
export async function recoverInterruptedImports(db: AppContext['db']): Promise<number> {
	const res = await db
		.updateTable('logger_imports')
		.set({
			status: 'failed',
			error:
				'interrupted by a server restart: import it again (rows already stored are skipped as duplicates)'
		})
		.where('status', '=', 'importing')
		.executeTakeFirst();
	return Number(res.numUpdatedRows);
}

/** Discards an upload that was never imported (an imported file stays with its record). */
export async function discardImport(ctx: AppContext, actor: Actor, view: ImportView) {
	const res = await ctx.db
		.deleteFrom('logger_imports')
		.where('id', '=', view.id)
		.where('status', 'in', ['previewed', 'failed'])
		.executeTakeFirst();
	if (Number(res.numDeletedRows) !== 1)
		throw new ApiError(
			409,
			'conflict',
			'an imported file is kept with its record and cannot be discarded'
		);
	await audit(ctx.db, actor, {
		action: 'history.import_discard',
		entity: 'logger_import',
		entityId: view.id,
		vesselId: view.vessel_id,
		details: { filename: view.filename }
	});
}
