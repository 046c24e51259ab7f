import { notFound } from '$lib/server/api/errors';
import { route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { getAttachment } from '$lib/server/records/repository';
import { recordShaft } from '$lib/server/records/service';

/**
 * The file itself. Only types whose bytes were checked are stored; nosniff
 * keeps a browser from reading them as anything else, and images are
 * sandboxed too (Chromium's PDF viewer will not open a sandboxed document).
 */
export const GET = route(async ({ params, url }) => {
	const { db } = context();
	const shaft = await recordShaft(db, params);
	const found = await getAttachment(db, shaft.id, Number(params.attachmentId));
	if (!found) throw notFound('attachment');
	// images open in the page; a PDF (which may carry scripts of its own) is downloaded unless asked for inline
	const inline = found.view.content_type.startsWith('image/')
		? !url.searchParams.has('download')
		: url.searchParams.has('inline');
	const disposition = inline ? 'inline' : 'attachment';
	return new Response(new Uint8Array(found.content), {
		headers: {
			'content-type': found.view.content_type,
			'content-length': String(found.content.length),
			'content-disposition': `${disposition}; filename*=UTF-8''${encodeURIComponent(found.view.filename)}`,
			'x-content-type-options': 'nosniff',
			...(found.view.content_type.startsWith('image/')
				? {
						'content-security-policy':
							"default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; sandbox"
					}
				: {}),
			'cache-control': 'private, max-age=3600'
		}
	});
});
