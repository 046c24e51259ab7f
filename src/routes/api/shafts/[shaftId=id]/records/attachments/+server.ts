import { json } from '@sveltejs/kit';
import { ApiError } from '$lib/server/api/errors';
import { requirePermission, route } from '$lib/server/api/handler';
import { readUpload } from '$lib/server/api/upload';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { listAttachments } from '$lib/server/records/repository';
import { addAttachment, ATTACHMENT_UPLOAD, recordShaft } from '$lib/server/records/service';
import { attachmentTypeOf } from '$lib/records/kinds';

export const GET = route(async ({ params }) => {
	const { db } = context();
	return { attachments: await listAttachments(db, (await recordShaft(db, params)).id) };
});

/**
 * A photo (JPEG, PNG, WebP) or a PDF: multipart/form-data with `file` and an
 * optional `notes` field (the page's form), or the file itself as the body
 * with its own Content-Type (name in ?filename=, notes in ?notes=) for
 * scripts. The bytes must be what the type says.
 */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'records.write');
	const { db } = context();
	const shaft = await recordShaft(db, event.params);
	const upload = await readUpload(event, ATTACHMENT_UPLOAD);
	const actual = attachmentTypeOf(upload.bytes);
	// a script says what it sends (a browser's part type is only a guess from the name): bytes of
	// another kind are a mistake to report, not to guess around
	if (upload.raw && actual && actual !== upload.type)
		throw new ApiError(
			415,
			'unsupported_type',
			`the body is ${actual}, not ${upload.type} as its Content-Type says`,
			{
				file: 'type_mismatch'
			}
		);
	const file = { name: upload.name, bytes: upload.bytes, notes: upload.field('notes') ?? '' };
	return json({ attachment: await addAttachment(db, actorOf(user), shaft, file) }, { status: 201 });
});
