import { ApiError } from '$lib/server/api/errors';
import { readQuery, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { samplesQuery } from '$lib/server/history/query';
import { readBuckets, readSamples } from '$lib/server/history/samples';
import { shaftOfPath } from '$lib/server/history/route-helpers';
import { autoBucket, RAW_MAX_MS, suggestedBucket } from '$lib/history/range';

/**
 * History of a shaft: raw samples (bucket absent or raw, at most a day) or
 * 1-minute / 1-hour buckets from the rollups; bucket=auto picks for the span.
 * fields=flow_lpm,supply_bar,… reads only those quantities (the others are null).
 */
export const GET = route(async (event) => {
	const q = readQuery(event.url, samplesQuery);
	const ctx = context();
	const h = await shaftOfPath(ctx, event.params);
	const bucket = q.bucket === 'auto' ? autoBucket(q.from, q.to) : (q.bucket ?? 'raw');
	if (bucket === 'raw' && q.to - q.from > RAW_MAX_MS) {
		const suggested = suggestedBucket(q.from, q.to);
		throw new ApiError(
			400,
			'range_too_long',
			`raw samples are limited to one day per request; ask for bucket=${suggested} (or bucket=auto) for this period`,
			{
				bucket: suggested
			}
		);
	}
	const head = {
		shaft_id: h.shaft.id,
		bucket,
		from: q.from,
		to: q.to,
		min_flow_lpm: h.minFlowLpm,
		margin_warning: h.marginWarning,
		stale_after_s: h.gapMs / 1000
	};
	if (bucket === 'raw')
		return { ...head, samples: readSamples(ctx.sqlite, h.shaft.id, q.from, q.to, q.fields) };
	return { ...head, buckets: readBuckets(ctx.sqlite, h.shaft.id, bucket, q.from, q.to, q.fields) };
});
