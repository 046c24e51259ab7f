import { notFound } from '$lib/server/api/errors';
import { route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { getOriginal } from '$lib/server/history/imports/repository';
import { importOfPath } from '$lib/server/history/route-helpers';

/** The file exactly as it was uploaded. */
export const GET = route(async (event) => {
	const ctx = context();
	const { view } = await importOfPath(ctx, event.params);
	const original = await getOriginal(ctx.db, view.id);
	if (!original) throw notFound('import');
	// the stored type was the uploader's browser's claim: send it as plain bytes, never as a page
	return new Response(new Uint8Array(original.original), {
		headers: {
			'content-type': 'application/octet-stream',
			'content-disposition': `attachment; filename="${original.filename.replace(/["\\\r\n]/g, '_')}"`,
			'x-content-type-options': 'nosniff',
			'cache-control': 'no-store'
		}
	});
});
