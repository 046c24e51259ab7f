import { ApiError } from '$lib/server/api/errors';
import { readQuery, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { samplesQuery } from '$lib/server/history/query';
import { readBuckets, readSamples } from '$lib/server/history/samples';
import { shaftOfPath } from '$lib/server/history/route-helpers';
import { autoBucket, BUCKET_MAX_MS, BUCKET_MAX_WORDS, suggestedBucket, type Bucket } from '$lib/history/range';

const WHAT: Record<Bucket, string> = { raw: 'raw samples', '1m': '1-minute buckets', '1h': '1-hour buckets' };

/**
 * History of a shaft: raw samples (bucket absent or raw, at most a day) or
 * 1-minute (at most 31 days) / 1-hour buckets (at most five years) from the
 * rollups; bucket=auto picks for the span.
 * fields=flow_lpm,supply_bar,… reads only those quantities (the others are null).
 */
export const GET = route(async (event) => {
	const q = readQuery(event.url, samplesQuery);
	const ctx = context();
	const h = await shaftOfPath(ctx, event.params);
	const bucket = q.bucket === 'auto' ? autoBucket(q.from, q.to) : (q.bucket ?? 'raw');
	if (q.to - q.from > BUCKET_MAX_MS[bucket]) {
		const suggested = suggestedBucket(q.from, q.to);
		const instead =
			BUCKET_MAX_MS[suggested] >= q.to - q.from && suggested !== bucket
				? `ask for bucket=${suggested} (or bucket=auto) for this period`
				: 'ask for the period in parts, or export it as CSV';
		throw new ApiError(
			400,
			'range_too_long',
			`${WHAT[bucket]} are limited to ${BUCKET_MAX_WORDS[bucket]} per request; ${instead}`,
			{ bucket: suggested }
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
