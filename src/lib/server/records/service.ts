/**
 * Adding records: validate (the zod shapes of $lib/schemas/records), judge
 * with the pure functions, store and audit in one transaction. Records are
 * evidence, so they are never edited or deleted: a mistaken entry is voided
 * (kept, with who voided it and why, and no longer counted) and entered again.
 */
import { createHash } from 'node:crypto';
import { judgeSealTest } from '$lib/records/seal-test';
import { runningClearance } from '$lib/records/clearance';
import { MATERIALS, shrinkFitDeltaK } from '$lib/records/shrink-fit';
import {
	ATTACHMENT_TYPES,
	attachmentTypeOf,
	MAX_ATTACHMENT_BYTES,
	type RecordKind
} from '$lib/records/kinds';
import type {
	BearingMeasurementBody,
	SealTestBody,
	ShrinkFitBody,
	WearReadingBody
} from '$lib/schemas/records';
import { ApiError } from '../api/errors';
import { sizeOverLimit, type UploadRules } from '../api/upload';
import { audit, type Actor } from '../audit';
import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/schema';
import {
	attachmentView,
	toBearingMeasurement,
	toSealTest,
	toShrinkFit,
	wearOf,
	type AttachmentView,
	type BearingMeasurementView,
	type SealTestView,
	type ShrinkFitView,
	type WearView
} from './repository';

export interface RecordShaft {
	id: number;
	vessel_id: number;
}

/** Every change of a shaft's records is audited against the shaft, with its vessel. */
function auditRecord(
	tx: Transaction<Database>,
	actor: Actor,
	shaft: RecordShaft,
	action: string,
	details: Record<string, unknown>,
	at?: number
) {
	return audit(tx, actor, {
		action,
		entity: 'shaft',
		entityId: shaft.id,
		vesselId: shaft.vessel_id,
		details,
		at
	});
}

const who = (actor: Actor, shaft: RecordShaft, now: number) => ({
	shaft_id: shaft.id,
	vessel_id: shaft.vessel_id,
	recorded_by: actor.userId,
	recorded_by_email: actor.name,
	created_at: now
});

export async function addSealTest(
	db: Kysely<Database>,
	actor: Actor,
	shaft: RecordShaft,
	body: SealTestBody
): Promise<SealTestView> {
	const judgement = judgeSealTest(body);
	return db.transaction().execute(async (tx) => {
		const row = await tx
			.insertInto('seal_tests')
			.values({
				...who(actor, shaft, Date.now()),
				seal: body.seal,
				tested_at: body.tested_at,
				test_pressure_bar: body.test_pressure_bar,
				hold_s: body.hold_s,
				resolution_bar: body.resolution_bar,
				leak_seen: body.leak_seen ? 1 : 0,
				readings: JSON.stringify([...body.readings].sort((a, b) => a.t_s - b.t_s)),
				result: judgement.result,
				judgement: JSON.stringify(judgement),
				notes: body.notes
			})
			.returningAll()
			.executeTakeFirstOrThrow();
		await auditRecord(tx, actor, shaft, 'records.seal_test.add', {
			record_id: row.id,
			seal: body.seal,
			result: judgement.result,
			test_pressure_bar: body.test_pressure_bar,
			hold_s: body.hold_s
		});
		return toSealTest(row);
	});
}

export async function addBearingMeasurement(
	db: Kysely<Database>,
	actor: Actor,
	shaft: RecordShaft,
	body: BearingMeasurementBody
): Promise<BearingMeasurementView> {
	const clearance = runningClearance(body);
	return db.transaction().execute(async (tx) => {
		const row = await tx
			.insertInto('bearing_measurements')
			.values({
				...who(actor, shaft, Date.now()),
				bearing: body.bearing,
				measured_at: body.measured_at,
				bore_mm: body.bore_mm,
				journal_mm: body.journal_mm,
				max_clearance_mm: body.max_clearance_mm,
				clearance_mm: clearance.clearance_mm,
				notes: body.notes
			})
			.returningAll()
			.executeTakeFirstOrThrow();
		await auditRecord(tx, actor, shaft, 'records.bearing_measurement.add', {
			record_id: row.id,
			bearing: body.bearing,
			bore_mm: body.bore_mm,
			journal_mm: body.journal_mm,
			clearance_mm: clearance.clearance_mm
		});
		return toBearingMeasurement(row);
	});
}

export async function addWearReading(
	db: Kysely<Database>,
	actor: Actor,
	shaft: RecordShaft,
	body: WearReadingBody
): Promise<WearView> {
	await db.transaction().execute(async (tx) => {
		const row = await tx
			.insertInto('wear_readings')
			.values({
				...who(actor, shaft, Date.now()),
				measured_at: body.measured_at,
				reading_mm: body.reading_mm,
				method: body.method,
				notes: body.notes
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await auditRecord(tx, actor, shaft, 'records.wear_reading.add', {
			record_id: row.id,
			measured_at: body.measured_at,
			reading_mm: body.reading_mm,
			method: body.method
		});
	});
	return wearOf(db, shaft.id);
}

export async function setWearLimit(
	db: Kysely<Database>,
	actor: Actor,
	shaft: RecordShaft,
	body: { wear_limit_mm: number; reason: string }
): Promise<WearView> {
	await db.transaction().execute(async (tx) => {
		const before = await tx
			.selectFrom('wear_limits')
			.select('wear_limit_mm')
			.where('shaft_id', '=', shaft.id)
			.executeTakeFirst();
		const values = {
			wear_limit_mm: body.wear_limit_mm,
			updated_at: Date.now(),
			updated_by_email: actor.name
		};
		await tx
			.insertInto('wear_limits')
			.values({ shaft_id: shaft.id, ...values })
			.onConflict((oc) => oc.column('shaft_id').doUpdateSet(values))
			.execute();
		await auditRecord(tx, actor, shaft, 'records.wear_limit.set', {
			wear_limit_mm: { from: before?.wear_limit_mm ?? null, to: body.wear_limit_mm },
			reason: body.reason
		});
	});
	return wearOf(db, shaft.id);
}

export async function addShrinkFit(
	db: Kysely<Database>,
	actor: Actor,
	shaft: RecordShaft,
	body: ShrinkFitBody
): Promise<ShrinkFitView> {
	const alpha =
		body.material === 'other'
			? body.alpha_per_k!
			: MATERIALS.find((m) => m.id === body.material)!.alpha_per_k;
	const delta = shrinkFitDeltaK({ ...body, alpha_per_k: alpha });
	return db.transaction().execute(async (tx) => {
		const row = await tx
			.insertInto('shrink_fit_plans')
			.values({
				...who(actor, shaft, Date.now()),
				bore_mm: body.bore_mm,
				interference_mm: body.interference_mm,
				assembly_clearance_mm: body.assembly_clearance_mm,
				material: body.material,
				alpha_per_k: alpha,
				ambient_c: body.ambient_c,
				delta_k: delta,
				heat_to_c: body.ambient_c + delta,
				notes: body.notes
			})
			.returningAll()
			.executeTakeFirstOrThrow();
		await auditRecord(tx, actor, shaft, 'records.shrink_fit.add', {
			record_id: row.id,
			bore_mm: body.bore_mm,
			interference_mm: body.interference_mm,
			material: body.material,
			heat_to_c: row.heat_to_c
		});
		return toShrinkFit(row);
	});
}

export interface AttachmentUpload {
	name: string;
	bytes: Uint8Array;
	notes: string;
}

/** A photo or PDF beside the records: the bytes decide the type, never the name alone. */
export async function addAttachment(
	db: Kysely<Database>,
	actor: Actor,
	shaft: RecordShaft,
	file: AttachmentUpload
): Promise<AttachmentView> {
	if (file.bytes.length === 0)
		throw new ApiError(422, 'invalid', 'file: the file is empty', { file: 'empty' });
	if (file.bytes.length > MAX_ATTACHMENT_BYTES) throw attachmentTooLarge(file.bytes.length);
	if (file.notes.trim().length > 2000)
		throw new ApiError(422, 'invalid', 'notes: at most 2000 characters', { notes: 'too_long' });
	const type = attachmentTypeOf(file.bytes);
	if (!type) {
		throw new ApiError(
			415,
			'unsupported_type',
			`“${file.name}” is not a JPEG, PNG or WebP photo or a PDF document`,
			{ file: 'unsupported_type' }
		);
	}
	const name = safeName(file.name, type);
	const sha256 = createHash('sha256').update(file.bytes).digest('hex');
	const id = await db.transaction().execute(async (tx) => {
		const row = await tx
			.insertInto('record_attachments')
			.values({
				...who(actor, shaft, Date.now()),
				filename: name,
				content_type: type,
				size_bytes: file.bytes.length,
				sha256,
				content: Buffer.from(file.bytes),
				notes: file.notes.trim()
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await auditRecord(tx, actor, shaft, 'records.attachment.add', {
			record_id: row.id,
			filename: name,
			content_type: type,
			size_bytes: file.bytes.length,
			sha256
		});
		return row.id;
	});
	return attachmentView(db, id);
}

export const attachmentTooLarge = (bytes: number) =>
	new ApiError(
		413,
		'too_large',
		`the file is ${sizeOverLimit(bytes, MAX_ATTACHMENT_BYTES)}`
	);

/** How the records read an attached file, from the API or the page's form. */
export const ATTACHMENT_UPLOAD: UploadRules = {
	maxBytes: MAX_ATTACHMENT_BYTES,
	tooLarge: attachmentTooLarge,
	rawTypes: Object.keys(ATTACHMENT_TYPES),
	defaultName: 'attachment',
	missing: 'choose a photo or PDF to attach',
	unsupported:
		'send multipart/form-data (field "file") or the file itself as image/jpeg, image/png, image/webp or application/pdf'
};

/** A name safe to send back in Content-Disposition, with the extension of its real type. */
function safeName(name: string, type: keyof typeof ATTACHMENT_TYPES): string {
	const cleaned =
		name
			.replace(/[\\/]/g, '_')
			.replace(/[^\p{L}\p{N} ._()-]/gu, '')
			.trim()
			.slice(0, 120) || 'attachment';
	const exts: readonly string[] = ATTACHMENT_TYPES[type].ext;
	return exts.some((e) => cleaned.toLowerCase().endsWith(e)) ? cleaned : `${cleaned}${exts[0]}`;
}

/** The shaft of a records path (hooks has already answered 404 outside the caller's scope). */
export async function recordShaft(
	db: Kysely<Database>,
	params: Partial<Record<string, string>>
): Promise<RecordShaft> {
	const shaft = await db
		.selectFrom('shafts')
		.select(['id', 'vessel_id'])
		.where('id', '=', Number(params.shaftId))
		.executeTakeFirst();
	if (!shaft) throw new ApiError(404, 'not_found', 'shaft not found');
	return shaft;
}

const TABLE_OF = {
	'seal-tests': 'seal_tests',
	'bearing-measurements': 'bearing_measurements',
	wear: 'wear_readings',
	'shrink-fits': 'shrink_fit_plans',
	attachments: 'record_attachments'
} as const satisfies Record<RecordKind, keyof Database>;

/**
 * Voids a record of the shaft: it stays, with who voided it, when and why,
 * and counts no more. 404 for a record of another shaft, 409 when it is void already.
 */
export async function voidRecord(
	db: Kysely<Database>,
	actor: Actor,
	shaft: RecordShaft,
	kind: RecordKind,
	id: number,
	reason: string
): Promise<{ id: number; kind: RecordKind; voided_at: number }> {
	const table = TABLE_OF[kind];
	const now = Date.now();
	return db.transaction().execute(async (tx) => {
		const row = await tx
			.selectFrom(table)
			.select(['id', 'voided_at'])
			.where('id', '=', id)
			.where('shaft_id', '=', shaft.id)
			.executeTakeFirst();
		if (!row) throw new ApiError(404, 'not_found', 'record not found');
		if (row.voided_at !== null) throw new ApiError(409, 'conflict', 'this record is void already');
		await tx
			.updateTable(table)
			.set({ voided_at: now, voided_by_email: actor.name, void_reason: reason })
			.where('id', '=', id)
			.execute();
		await auditRecord(tx, actor, shaft, 'records.void', { kind, record_id: id, reason }, now);
		return { id, kind, voided_at: now };
	});
}
