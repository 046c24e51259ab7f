import { z } from 'zod';
import { wholeNumber } from './query';
import { ALARM_TYPES } from '$lib/alarms/types';
import { ALARM_STATES, MAX_SHELVE_S } from '$lib/alarms/state-machine';

const comment = z.string().trim().max(1000);

export const acknowledgeBody = z.object({ comment: comment.optional() });

export const shelveBody = z.object({
	/** bounded: ISA-18.2 shelving always ends; 8 h is the most Aftwater allows */
	duration_s: z
		.number()
		.int('whole seconds')
		.min(60, 'at least 60 s')
		.max(MAX_SHELVE_S, `at most ${MAX_SHELVE_S / 3600} h`),
	reason: z.string().trim().min(3, 'say why the alarm is shelved').max(500)
});

export const unshelveBody = z.object({ comment: comment.optional() });

export const outOfServiceBody = z.object({
	type: z.enum(ALARM_TYPES),
	out_of_service: z.boolean(),
	reason: z.string().trim().min(3, 'say why').max(500)
});

export const alarmListQuery = z.object({
	/** active (not yet normal), all, or one ISA-18.2 state (e.g. unacknowledged, shelved) */
	state: z.enum(['active', 'all', ...ALARM_STATES]).default('active'),
	vessel: z.string().max(40).optional(),
	from: z.string().optional(),
	to: z.string().optional(),
	limit: wholeNumber(1, 5000).optional()
});
