/** Input shapes for vessels and shafts, shared by the API, the forms and the tests. */
import { z } from 'zod';
import { CODE_PATTERN, OPERATING_MODES, SHAFT_POSITIONS, WATER_KINDS } from '$lib/types';
import { DEFAULT_MIN_FLOW_FACTOR_LPM_PER_MM } from '$lib/flow';

export const code = z
	.string()
	.trim()
	.regex(CODE_PATTERN, 'lowercase letters, digits and dashes, 1–32 characters, no dash at the ends');

const name = z.string().trim().min(1, 'required').max(80);

/** "separator" and "gateway" name topics of their own: a shaft cannot be called that */
const shaftCode = code.refine((c) => c !== 'separator' && c !== 'gateway', 'reserved for the separator and gateway topics');

const timeZone = z
	.string()
	.trim()
	.refine((tz) => {
		try {
			new Intl.DateTimeFormat('en', { timeZone: tz });
			return true;
		} catch {
			return false;
		}
	}, 'an IANA time zone such as Europe/Oslo or UTC');

// Fields without defaults: an update must leave what it does not name as it is
// (zod fills a default into a .partial() field too, which would reset it).
const vesselFields = {
	name,
	kind: z.string().trim().max(60).nullish(),
	time_zone: timeZone,
	salinity_psu: z.number().min(0).max(42).nullish()
};

export const vesselCreate = z.object({ code, ...vesselFields, time_zone: timeZone.default('UTC') });
export type VesselCreate = z.infer<typeof vesselCreate>;

export const vesselUpdate = z.object(vesselFields).partial();
export type VesselUpdate = z.infer<typeof vesselUpdate>;

export const operatingModeUpdate = z.object({
	operating_mode: z.enum(OPERATING_MODES),
	reason: z.string().trim().min(3, 'say why the mode changes').max(500)
});

const shaftFields = {
	name,
	position: z.enum(SHAFT_POSITIONS),
	/** at the bearing */
	diameter_mm: z.number().gt(20, 'above 20 mm').lt(2000, 'below 2000 mm'),
	water: z.enum(WATER_KINDS),
	centreline_depth_m: z.number().min(0).max(40),
	min_flow_factor_lpm_per_mm: z.number().gt(0).max(5, 'at most 5 L/min per mm')
};

export const shaftCreate = z.object({
	code: shaftCode,
	...shaftFields,
	position: shaftFields.position.default('centre'),
	water: shaftFields.water.default('sea'),
	centreline_depth_m: shaftFields.centreline_depth_m.default(0),
	min_flow_factor_lpm_per_mm: shaftFields.min_flow_factor_lpm_per_mm.default(DEFAULT_MIN_FLOW_FACTOR_LPM_PER_MM)
});
export type ShaftCreate = z.infer<typeof shaftCreate>;

export const shaftUpdate = z.object(shaftFields).partial();
export type ShaftUpdate = z.infer<typeof shaftUpdate>;
