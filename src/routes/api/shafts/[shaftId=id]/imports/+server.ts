import { json } from '@sveltejs/kit';
import { ApiError } from '$lib/server/api/errors';
import { requirePermission, route } from '$lib/server/api/handler';
import { readUpload, sizeOverLimit } from '$lib/server/api/upload';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { listImports } from '$lib/server/history/imports/repository';
import { createImport } from '$lib/server/history/imports/service';
import { shaftOfPath } from '$lib/server/history/route-helpers';
import { MAX_UPLOAD_BYTES } from '$lib/history/import/sniff';

/** Logger files uploaded for the shaft, newest first. */
export const GET = route(async (event) => {
	const h = await shaftOfPath(context(), event.params);
	return { imports: await listImports(context().db, { shaftId: h.shaft.id }) };
});

/**
 * The upload: multipart/form-data with a `file` field (the page's form), or
 * the file itself as the body (Content-Type text/csv or text/plain, name in
 * ?filename=) for scripts — SvelteKit refuses cross-origin form posts, and a
 * script has no origin to send. Answers 201 with the stored upload, a
 * suggested mapping and its preview.
 */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'history.upload');
	const ctx = context();
	const h = await shaftOfPath(ctx, event.params);
	const file = await readUpload(event, {
		maxBytes: MAX_UPLOAD_BYTES,
		tooLarge,
		rawTypes: ['text/csv', 'text/plain'],
		defaultName: 'upload.csv',
		missing: 'choose a file to upload',
		unsupported: 'send the file as multipart/form-data (field "file") or as a text/csv body'
	});
	return json(await createImport(ctx, actorOf(user), h, file), { status: 201 });
});

const tooLarge = (bytes: number) =>
	new ApiError(
		413,
		'too_large',
		`the upload is ${sizeOverLimit(bytes, MAX_UPLOAD_BYTES)} — split the logger file by month`
	);
