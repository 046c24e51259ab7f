/**
 * Commissioning and maintenance records of a shaft: rows → views. The
 * judgements (seal test result, clearance state, wear trend, shrink-fit plan)
 * come from the pure functions in $lib/records, so the page, the API and the
 * tests all see the same figures.
 */
import type { Kysely, Selectable } from 'kysely';
import { runningClearance, type ClearanceJudgement } from '$lib/records/clearance';
import type { PressureReading, SealTestJudgement } from '$lib/records/seal-test';
import { MATERIALS, planShrinkFit, type ShrinkFitPlan } from '$lib/records/shrink-fit';
import { wearTrend, type WearTrend } from '$lib/records/wear';
import type { BearingStation, SealPosition, WearMethod } from '$lib/records/kinds';
import type { Database } from '../db/schema';
import type {
	BearingMeasurementsTable,
	SealTestsTable,
	ShrinkFitPlansTable
} from '../db/tables/records';

export interface Voided {
	at: number;
	by: string;
	reason: string;
}

interface RecordView {
	id: number;
	shaft_id: number;
	recorded_by: string;
	notes: string;
	created_at: number;
	/** a voided record is kept, and shown, but counts no more */
	voided: Voided | null;
}

export interface SealTestView extends RecordView {
	seal: SealPosition;
	tested_at: number;
	test_pressure_bar: number;
	hold_s: number;
	resolution_bar: number;
	leak_seen: boolean;
	readings: PressureReading[];
	result: 'pass' | 'fail';
	judgement: SealTestJudgement;
}

export interface BearingMeasurementView extends RecordView {
	bearing: BearingStation;
	measured_at: number;
	bore_mm: number;
	journal_mm: number;
	max_clearance_mm: number | null;
	clearance: ClearanceJudgement;
}

export interface WearReadingView extends RecordView {
	measured_at: number;
	reading_mm: number;
	method: WearMethod;
	/** reading − baseline; null for a voided reading */
	wear_mm: number | null;
}

export interface WearView {
	wear_limit_mm: number | null;
	limit_updated_at: number | null;
	limit_updated_by: string | null;
	readings: WearReadingView[];
	trend: WearTrend;
}

export interface ShrinkFitView extends RecordView {
	bore_mm: number;
	interference_mm: number;
	assembly_clearance_mm: number;
	material: string;
	material_label: string;
	alpha_per_k: number;
	ambient_c: number;
	plan: ShrinkFitPlan;
}

export interface AttachmentView extends RecordView {
	filename: string;
	content_type: string;
	size_bytes: number;
	sha256: string;
	/** where the file itself is served */
	url: string;
}

export interface ShaftRecords {
	seal_tests: SealTestView[];
	bearing_measurements: BearingMeasurementView[];
	wear: WearView;
	shrink_fits: ShrinkFitView[];
	attachments: AttachmentView[];
}

const base = (r: {
	id: number;
	shaft_id: number;
	recorded_by_email: string;
	notes: string;
	created_at: number;
	voided_at: number | null;
	voided_by_email: string | null;
	void_reason: string | null;
}): RecordView => ({
	id: r.id,
	shaft_id: r.shaft_id,
	recorded_by: r.recorded_by_email,
	notes: r.notes,
	created_at: r.created_at,
	voided:
		r.voided_at === null
			? null
			: { at: r.voided_at, by: r.voided_by_email ?? '', reason: r.void_reason ?? '' }
});

export function toSealTest(r: Selectable<SealTestsTable>): SealTestView {
	return {
		...base(r),
		seal: r.seal,
		tested_at: r.tested_at,
		test_pressure_bar: r.test_pressure_bar,
		hold_s: r.hold_s,
		resolution_bar: r.resolution_bar,
		leak_seen: r.leak_seen === 1,
		readings: JSON.parse(r.readings),
		result: r.result,
		judgement: JSON.parse(r.judgement)
	};
}

export function toBearingMeasurement(
	r: Selectable<BearingMeasurementsTable>
): BearingMeasurementView {
	return {
		...base(r),
		bearing: r.bearing,
		measured_at: r.measured_at,
		bore_mm: r.bore_mm,
		journal_mm: r.journal_mm,
		max_clearance_mm: r.max_clearance_mm,
		clearance: runningClearance(r)
	};
}

export function toShrinkFit(r: Selectable<ShrinkFitPlansTable>): ShrinkFitView {
	return {
		...base(r),
		bore_mm: r.bore_mm,
		interference_mm: r.interference_mm,
		assembly_clearance_mm: r.assembly_clearance_mm,
		material: r.material,
		material_label: MATERIALS.find((m) => m.id === r.material)?.label ?? 'Other material',
		alpha_per_k: r.alpha_per_k,
		ambient_c: r.ambient_c,
		plan: planShrinkFit(r)
	};
}

export async function listSealTests(
	db: Kysely<Database>,
	shaftId: number
): Promise<SealTestView[]> {
	const rows = await db
		.selectFrom('seal_tests')
		.selectAll()
		.where('shaft_id', '=', shaftId)
		.orderBy('tested_at', 'desc')
		.orderBy('id', 'desc')
		.execute();
	return rows.map(toSealTest);
}

export async function listBearingMeasurements(
	db: Kysely<Database>,
	shaftId: number
): Promise<BearingMeasurementView[]> {
	const rows = await db
		.selectFrom('bearing_measurements')
		.selectAll()
		.where('shaft_id', '=', shaftId)
		.orderBy('measured_at', 'desc')
		.orderBy('id', 'desc')
		.execute();
	return rows.map(toBearingMeasurement);
}

export async function wearOf(db: Kysely<Database>, shaftId: number): Promise<WearView> {
	const [rows, limit] = await Promise.all([
		db
			.selectFrom('wear_readings')
			.selectAll()
			.where('shaft_id', '=', shaftId)
			.orderBy('measured_at', 'asc')
			.orderBy('id', 'asc')
			.execute(),
		db.selectFrom('wear_limits').selectAll().where('shaft_id', '=', shaftId).executeTakeFirst()
	]);
	// a voided reading is shown but not counted: the earliest reading still in force is the baseline
	const trend = wearTrend(
		rows.filter((r) => r.voided_at === null),
		limit?.wear_limit_mm ?? null
	);
	const baseline = trend.baseline?.reading_mm ?? null;
	const readings: WearReadingView[] = rows.map((r) => ({
		...base(r),
		measured_at: r.measured_at,
		reading_mm: r.reading_mm,
		method: r.method,
		wear_mm: r.voided_at === null && baseline !== null ? r.reading_mm - baseline : null
	}));
	return {
		wear_limit_mm: limit?.wear_limit_mm ?? null,
		limit_updated_at: limit?.updated_at ?? null,
		limit_updated_by: limit?.updated_by_email ?? null,
		readings,
		trend
	};
}

export async function listShrinkFits(
	db: Kysely<Database>,
	shaftId: number
): Promise<ShrinkFitView[]> {
	const rows = await db
		.selectFrom('shrink_fit_plans')
		.selectAll()
		.where('shaft_id', '=', shaftId)
		.orderBy('created_at', 'desc')
		.orderBy('id', 'desc')
		.execute();
	return rows.map(toShrinkFit);
}

const ATTACHMENT_COLUMNS = [
	'id',
	'shaft_id',
	'recorded_by_email',
	'notes',
	'created_at',
	'voided_at',
	'voided_by_email',
	'void_reason',
	'filename',
	'content_type',
	'size_bytes',
	'sha256'
] as const;

function toAttachment(
	r: Pick<Selectable<Database['record_attachments']>, (typeof ATTACHMENT_COLUMNS)[number]>
): AttachmentView {
	return {
		...base(r),
		filename: r.filename,
		content_type: r.content_type,
		size_bytes: r.size_bytes,
		sha256: r.sha256,
		url: `/api/shafts/${r.shaft_id}/records/attachments/${r.id}`
	};
}

export async function listAttachments(
	db: Kysely<Database>,
	shaftId: number
): Promise<AttachmentView[]> {
	const rows = await db
		.selectFrom('record_attachments')
		.select(ATTACHMENT_COLUMNS)
		.where('shaft_id', '=', shaftId)
		.orderBy('created_at', 'desc')
		.orderBy('id', 'desc')
		.execute();
	return rows.map(toAttachment);
}

export async function getAttachment(db: Kysely<Database>, shaftId: number, id: number) {
	const row = await db
		.selectFrom('record_attachments')
		.selectAll()
		.where('id', '=', id)
		.where('shaft_id', '=', shaftId)
		.executeTakeFirst();
	return row ? { view: toAttachment(row), content: row.content } : undefined;
}

export async function attachmentView(db: Kysely<Database>, id: number): Promise<AttachmentView> {
	return toAttachment(
		await db
			.selectFrom('record_attachments')
			.select(ATTACHMENT_COLUMNS)
			.where('id', '=', id)
			.executeTakeFirstOrThrow()
	);
}

export async function shaftRecords(db: Kysely<Database>, shaftId: number): Promise<ShaftRecords> {
	const [seal_tests, bearing_measurements, wear, shrink_fits, attachments] = await Promise.all([
		listSealTests(db, shaftId),
		listBearingMeasurements(db, shaftId),
		wearOf(db, shaftId),
		listShrinkFits(db, shaftId),
		listAttachments(db, shaftId)
	]);
	return { seal_tests, bearing_measurements, wear, shrink_fits, attachments };
}

/** What a report says of a shaft's installation: the latest records in force and the wear trend. */
export interface RecordsSummary {
	seal_test: SealTestView | null;
	bearing_measurement: BearingMeasurementView | null;
	wear: Pick<WearView, 'wear_limit_mm' | 'trend'>;
}

export async function recordsSummary(
	db: Kysely<Database>,
	shaftId: number
): Promise<RecordsSummary> {
	const [seals, bearings, wear] = await Promise.all([
		listSealTests(db, shaftId),
		listBearingMeasurements(db, shaftId),
		wearOf(db, shaftId)
	]);
	return {
		seal_test: seals.find((s) => !s.voided) ?? null,
		bearing_measurement: bearings.find((b) => !b.voided) ?? null,
		wear: { wear_limit_mm: wear.wear_limit_mm, trend: wear.trend }
	};
}
