/** Input shapes of the commissioning and maintenance records (API bodies and forms). */
import { DateTime } from 'luxon';
import { z } from 'zod';
import { BEARING_STATIONS, SEAL_POSITIONS, WEAR_METHODS } from '$lib/records/kinds';
import { MATERIALS } from '$lib/records/shrink-fit';

const notes = z.string().trim().max(2000).default('');
/** a time the work was done: epoch ms or ISO 8601 with a zone; not in the future */
const when = z.union([z.number().int(), z.string().trim().min(1)]).transform((v, ctx) => {
	if (typeof v === 'number' && v > 0 && v < 1e11) {
		ctx.addIssue({
			code: 'custom',
			message: 'this looks like epoch seconds: send epoch milliseconds or ISO 8601'
		});
		return z.NEVER;
	}
	const ms =
		typeof v === 'number'
			? v
			: /(Z|[+-]\d\d:?\d\d)$/i.test(v) || /^\d{4}-\d\d-\d\d$/.test(v)
				? // luxon refuses a day the month has not (Date.parse rolls 30 February on to 2 March)
					DateTime.fromISO(v, { zone: 'utc' }).toMillis()
				: NaN;
	if (!Number.isFinite(ms)) {
		ctx.addIssue({
			code: 'custom',
			message: 'a time as epoch ms or ISO 8601 with a zone (…Z or ±hh:mm)'
		});
		return z.NEVER;
	}
	if (ms < Date.UTC(1950, 0, 1) || ms > Date.now() + 86_400_000) {
		ctx.addIssue({ code: 'custom', message: 'a time between 1950 and today' });
		return z.NEVER;
	}
	return ms;
});
const mm = (max: number) =>
	z.number().finite().positive('more than 0').max(max, `at most ${max} mm`);

export const sealTestBody = z
	.object({
		seal: z.enum(SEAL_POSITIONS).default('aft'),
		tested_at: when,
		test_pressure_bar: z.number().finite().positive('more than 0').max(50, 'at most 50 bar'),
		hold_s: z.number().int('whole seconds').min(10, 'at least 10 s').max(86_400, 'at most a day'),
		resolution_bar: z.number().finite().positive('more than 0').max(5, 'at most 5 bar'),
		leak_seen: z.boolean(),
		readings: z
			.array(
				z.object({
					t_s: z
						.number()
						.finite()
						.min(0, 'seconds from the start, 0 or more')
						.max(86_400 * 2),
					pressure_bar: z.number().finite().min(-1.1).max(100)
				})
			)
			.min(2, 'at least two readings: the start and the end of the hold')
			.max(10_000, 'at most 10 000 readings')
			.refine(
				(r) => new Set(r.map((x) => x.t_s)).size === r.length,
				'two readings at the same time'
			),
		notes
	})
	// a gauge whose step is as large as the allowed fall (10 % of the test pressure) cannot judge the test
	.refine((b) => !(b.test_pressure_bar > 0) || b.resolution_bar < b.test_pressure_bar * 0.1, {
		message: 'the gauge is too coarse for this test pressure: its step must be under 10 % of it',
		path: ['resolution_bar']
	});
export type SealTestBody = z.output<typeof sealTestBody>;

export const bearingMeasurementBody = z
	.object({
		bearing: z.enum(BEARING_STATIONS).default('aft'),
		measured_at: when,
		bore_mm: mm(3000),
		journal_mm: mm(3000),
		max_clearance_mm: z.number().finite().positive('more than 0').max(50).nullable().default(null),
		notes
	})
	.refine((b) => Math.abs(b.bore_mm - b.journal_mm) < 0.1 * b.journal_mm, {
		message: 'bore and journal differ by more than 10 %: check both are diameters in the same unit',
		path: ['bore_mm']
	});
export type BearingMeasurementBody = z.output<typeof bearingMeasurementBody>;

export const wearReadingBody = z.object({
	measured_at: when,
	reading_mm: z.number().finite().min(-100).max(200),
	method: z.enum(WEAR_METHODS).default('poker_gauge'),
	notes
});
export type WearReadingBody = z.output<typeof wearReadingBody>;

export const wearLimitBody = z.object({
	wear_limit_mm: z.number().finite().positive('more than 0').max(100, 'at most 100 mm'),
	reason: z.string().trim().min(3, 'say where the limit comes from').max(500)
});

const materialIds = MATERIALS.map((m) => m.id) as [string, ...string[]];
export const shrinkFitBody = z
	.object({
		bore_mm: mm(3000),
		interference_mm: z.number().finite().positive('more than 0').max(20),
		assembly_clearance_mm: z.number().finite().min(0, '0 or more').max(20),
		material: z.enum([...materialIds, 'other']),
		/** required with material "other": 1/K */
		alpha_per_k: z.number().finite().min(1e-7).max(5e-4).optional(),
		ambient_c: z.number().finite().min(-30).max(60).default(20),
		notes
	})
	.refine((b) => b.material !== 'other' || b.alpha_per_k !== undefined, {
		message: 'give the expansion coefficient (1/K) for another material',
		path: ['alpha_per_k']
	});
export type ShrinkFitBody = z.output<typeof shrinkFitBody>;

export const voidBody = z.object({
	reason: z.string().trim().min(3, 'say why the record is void').max(500)
});
