import { json } from '@sveltejs/kit';
import { ApiError } from '$lib/server/api/errors';
import { requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { listAttachments } from '$lib/server/records/repository';
import { addAttachment, attachmentTooLarge, recordShaft } from '$lib/server/records/service';
import { ATTACHMENT_TYPES, attachmentTypeOf, MAX_ATTACHMENT_BYTES } from '$lib/records/kinds';

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
	const type = (event.request.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
	const length = Number(event.request.headers.get('content-length') ?? 0);
	if (length > MAX_ATTACHMENT_BYTES + 64 * 1024) throw attachmentTooLarge(length);

	let file: { name: string; bytes: Uint8Array; notes: string };
	if (type === 'multipart/form-data') {
		let form: FormData;
		try {
			form = await event.request.formData();
		} catch {
			throw new ApiError(400, 'bad_body', 'the body is not readable multipart/form-data');
		}
		const part = form.get('file');
		if (!(part instanceof File) || part.size === 0)
			throw new ApiError(422, 'invalid', 'file: choose a photo or PDF to attach', {
				file: 'required'
			});
		if (part.size > MAX_ATTACHMENT_BYTES) throw attachmentTooLarge(part.size);
		file = {
			name: part.name,
			bytes: new Uint8Array(await part.arrayBuffer()),
			notes: String(form.get('notes') ?? '')
		};
	} else if (type in ATTACHMENT_TYPES) {
		const bytes = new Uint8Array(await event.request.arrayBuffer());
		if (bytes.length > MAX_ATTACHMENT_BYTES) throw attachmentTooLarge(bytes.length);
		const actual = attachmentTypeOf(bytes);
		// a script says what it sends: bytes of another kind are a mistake to report, not to guess around
		if (actual && actual !== type)
			throw new ApiError(
				415,
				'unsupported_type',
				`the body is ${actual}, not ${type} as its Content-Type says`,
				{ file: 'type_mismatch' }
			);
		file = {
			name: event.url.searchParams.get('filename') || 'attachment',
			bytes,
			notes: event.url.searchParams.get('notes') ?? ''
		};
	} else {
		throw new ApiError(
			415,
			'unsupported_media_type',
			'send multipart/form-data (field "file") or the file itself as image/jpeg, image/png, image/webp or application/pdf'
		);
	}
	return json({ attachment: await addAttachment(db, actorOf(user), shaft, file) }, { status: 201 });
});
