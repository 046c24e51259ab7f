import { readQuery, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { alarmsCsv, bucketsCsv, exportFilename, samplesCsv } from '$lib/server/history/export';
import { exportQuery } from '$lib/server/history/query';
import { shaftOfPath } from '$lib/server/history/route-helpers';

/**
 * CSV of a shaft over [from, to), streamed: kind=samples (default; bucket=raw,
 * 1m or 1h) or kind=alarms (the shaft's and its separator's alarm instances).
 */
export const GET = route(async (event) => {
	const q = readQuery(event.url, exportQuery);
	const ctx = context();
	const h = await shaftOfPath(ctx, event.params);
	const id = h.shaft.id;
	const body =
		q.kind === 'alarms'
			? alarmsCsv(ctx.db, h.vessel.id, id, q.from, q.to)
			: q.bucket === 'raw'
				? samplesCsv(ctx.sqlite, id, q.from, q.to)
				: bucketsCsv(ctx.sqlite, id, q.bucket, q.from, q.to);
	const kind =
		q.kind === 'alarms' ? 'alarms' : q.bucket === 'raw' ? 'samples' : `buckets-${q.bucket}`;
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${exportFilename(h.vessel.code, h.shaft.code, kind, q.from, q.to)}"`,
			'cache-control': 'no-store'
		}
	});
});
