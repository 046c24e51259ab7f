/** The purge API's input shapes and the running service, for the thin routes. */
import { z } from 'zod';
import { MAX_TIME_MS } from '$lib/history/range';
import { MAX_DURATION_S, MIN_DURATION_S } from '$lib/purge';
import { ApiError } from '../api/errors';
import { parseInstant } from '../api/time';
import type { AppContext } from '../context';
import type { PurgeService } from './service';

/** POST …/purge: the duration within the schedule's bounds; the schedule's own when left out */
export const purgeNowInput = z.object({
	duration_s: z
		.number({ error: `a whole number of seconds, ${MIN_DURATION_S} to ${MAX_DURATION_S}` })
		.int('a whole number of seconds')
		.min(MIN_DURATION_S, `at least ${MIN_DURATION_S} s`)
		.max(MAX_DURATION_S, `at most ${MAX_DURATION_S} s`)
		.optional()
});

export const purgesQuery = z.object({
	from: z.string().optional(),
	to: z.string().optional()
});

/** ms: GET …/purges without `from` covers the last day */
const DEFAULT_RANGE_MS = 86_400_000;

export function purgesRange(q: z.output<typeof purgesQuery>, now = Date.now()) {
	const to = q.to === undefined ? now : parseInstant(q.to, 'to');
	// a default stays a time a Date can hold
	const from = q.from === undefined ? Math.max(to - DEFAULT_RANGE_MS, -MAX_TIME_MS) : parseInstant(q.from, 'from');
	if (from > to)
		throw new ApiError(400, 'bad_query', 'from: must not be after to', {
			from: 'must not be after to'
		});
	return { from, to };
}

export function purgeService(ctx: AppContext): PurgeService {
	const service = ctx.services.purge;
	if (!service) throw new ApiError(503, 'unavailable', 'the purge scheduler is not running');
	return service;
}
