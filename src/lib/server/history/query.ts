/** Query parameters of the history API, one schema per shape. */
import { z } from 'zod';
import { DAY_MS, MAX_PERIOD_MS, MAX_TIME_MS, parseInstant } from '$lib/history/range';

const instant = z.string().transform((s, ctx) => {
	const v = parseInstant(s);
	if (v === null) {
		ctx.addIssue({
			code: 'custom',
			message: 'ISO 8601 with a zone (2026-03-01T00:00:00Z) or epoch milliseconds'
		});
		return z.NEVER;
	}
	return v;
});

const period = z.object({ from: instant.optional(), to: instant.optional() });

/** from/to are both optional: to defaults to now, from to a day before to. */
function withDefaults<Q extends { from?: number; to?: number }>(q: Q, ctx: z.RefinementCtx) {
	const to = q.to ?? Date.now();
	const from = q.from ?? Math.max(to - DAY_MS, -MAX_TIME_MS); // a default stays a time a Date can hold
	if (!(to > from)) ctx.addIssue({ code: 'custom', path: ['to'], message: 'must be after from' });
	else if (to - from > MAX_PERIOD_MS)
		ctx.addIssue({ code: 'custom', path: ['from'], message: 'the period may be at most 20 years' });
	return { ...q, from, to };
}

const QUANTITY = z.enum(['flow_lpm', 'supply_bar', 'temp_c', 'shaft_rpm']);

export const samplesQuery = period
	.extend({
		bucket: z.enum(['raw', '1m', '1h', 'auto']).optional(),
		/** comma-separated quantities to read (flow always); all by default */
		fields: z
			.string()
			.transform((s) =>
				s
					.split(',')
					.map((f) => f.trim())
					.filter(Boolean)
			)
			.pipe(z.array(QUANTITY, { error: 'a list of flow_lpm, supply_bar, temp_c, shaft_rpm' }))
			.optional()
	})
	.transform(withDefaults);
export const complianceQuery = period
	.extend({ items: z.enum(['0', '1']).optional() })
	.transform(withDefaults);
export const fleetComplianceQuery = period.transform(withDefaults);
export const exportQuery = period
	.extend({
		kind: z.enum(['samples', 'alarms']).default('samples'),
		bucket: z.enum(['raw', '1m', '1h']).default('raw')
	})
	.transform(withDefaults);
