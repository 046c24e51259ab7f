/** Tables of the records concern (migrations/20261201_0009_records.ts). */
import type { Generated } from 'kysely';
import type { BearingStation, SealPosition, WearMethod } from '$lib/records/kinds';

interface RecordColumns {
	id: Generated<number>;
	shaft_id: number;
	vessel_id: number;
	/** user id; null once the account is deleted */
	recorded_by: string | null;
	recorded_by_email: string;
	notes: Generated<string>;
	created_at: number;
	/** set when the record was voided (migrations/20261201_0010_records_void.ts) */
	voided_at: number | null;
	voided_by_email: string | null;
	void_reason: string | null;
}

export interface SealTestsTable extends RecordColumns {
	seal: SealPosition;
	tested_at: number;
	test_pressure_bar: number;
	hold_s: number;
	resolution_bar: number;
	/** 0 or 1 */
	leak_seen: number;
	/** JSON PressureReading[] */
	readings: string;
	result: 'pass' | 'fail';
	/** JSON SealTestJudgement */
	judgement: string;
}

export interface BearingMeasurementsTable extends RecordColumns {
	bearing: BearingStation;
	measured_at: number;
	bore_mm: number;
	journal_mm: number;
	max_clearance_mm: number | null;
	clearance_mm: number;
}

export interface WearReadingsTable extends RecordColumns {
	measured_at: number;
	reading_mm: number;
	method: Generated<WearMethod>;
}

export interface WearLimitsTable {
	shaft_id: number;
	wear_limit_mm: number;
	updated_at: number;
	updated_by_email: string;
}

export interface ShrinkFitPlansTable extends RecordColumns {
	bore_mm: number;
	interference_mm: number;
	assembly_clearance_mm: number;
	material: string;
	alpha_per_k: number;
	ambient_c: number;
	delta_k: number;
	heat_to_c: number;
}

export interface RecordAttachmentsTable extends RecordColumns {
	filename: string;
	content_type: string;
	size_bytes: number;
	sha256: string;
	content: Buffer;
}

export interface RecordsTables {
	seal_tests: SealTestsTable;
	bearing_measurements: BearingMeasurementsTable;
	wear_readings: WearReadingsTable;
	wear_limits: WearLimitsTable;
	shrink_fit_plans: ShrinkFitPlansTable;
	record_attachments: RecordAttachmentsTable;
}
