/**
 * Reading an uploaded file, the two ways routes take one: multipart/form-data
 * with a `file` field (a page's form), or the file itself as the body with its
 * own Content-Type and its name in ?filename= (a script: SvelteKit refuses
 * cross-origin form posts, and a script has no origin to send). Too large is
 * 413 before the body is read where the length is declared; no file is 422;
 * another kind of body is 415.
 */
import type { RequestEvent } from '@sveltejs/kit';
import { ApiError } from './errors';

export interface Upload {
	name: string;
	/** the declared type: the part's, or the body's Content-Type without parameters */
	type: string;
	bytes: Uint8Array;
	/** the body was the file itself (its type declared by the sender, not guessed by a browser) */
	raw: boolean;
	/** another field of the form, or for a raw body the query parameter of that name */
	field(name: string): string | null;
}

export interface UploadRules {
	maxBytes: number;
	tooLarge: (bytes: number) => ApiError;
	/** body types taken as the file itself */
	rawTypes: readonly string[];
	/** the name of a raw body sent without ?filename= */
	defaultName: string;
	/** what to say when the form has no file: "choose a file to upload" */
	missing: string;
	/** what to say to any other body */
	unsupported: string;
}

/** the multipart envelope adds a few hundred bytes to the file */
const ENVELOPE_BYTES = 64 * 1024;

const MB = 1_048_576;

/**
 * "20.03 MB; the limit is 20 MB": a size over a limit in MB (2^20 bytes), with as many decimals
 * as it takes for the size not to read as the limit itself.
 */
export function sizeOverLimit(bytes: number, limit: number): string {
	let digits = 1;
	while (digits < 6 && Number((bytes / MB).toFixed(digits)) <= limit / MB) digits++;
	return `${(bytes / MB).toFixed(digits)} MB; the limit is ${limit / MB} MB`;
}

/**
 * A body sent without a length (chunked) is cut off by the server at BODY_SIZE_LIMIT with an error
 * of status 413 (SvelteKit's adapter-node): said as such, not as a failure of the server.
 */
function overLimit(err: unknown): ApiError | null {
	if ((err as { status?: unknown } | null)?.status !== 413) return null;
	return new ApiError(413, 'too_large', 'the body is larger than this server accepts (BODY_SIZE_LIMIT)');
}

export async function readUpload(event: RequestEvent, rules: UploadRules): Promise<Upload> {
	const { request, url } = event;
	const type = (request.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
	const length = Number(request.headers.get('content-length') ?? 0);
	if (length > rules.maxBytes + ENVELOPE_BYTES) throw rules.tooLarge(length);

	if (type === 'multipart/form-data') {
		let form: FormData;
		try {
			form = await request.formData();
		} catch (err) {
			throw overLimit(err) ?? new ApiError(400, 'bad_body', 'the body is not readable multipart/form-data');
		}
		const part = form.get('file');
		// a form sent with no file chosen carries an empty part without a name
		if (!(part instanceof File) || (part.size === 0 && part.name === ''))
			throw new ApiError(422, 'invalid', `file: ${rules.missing}`, { file: 'required' });
		if (part.size > rules.maxBytes) throw rules.tooLarge(part.size);
		return {
			name: part.name,
			type: part.type,
			bytes: new Uint8Array(await part.arrayBuffer()),
			raw: false,
			field: (name) => {
				const v = form.get(name);
				return typeof v === 'string' ? v : null;
			}
		};
	}
	if (rules.rawTypes.includes(type)) {
		let bytes: Uint8Array;
		try {
			bytes = new Uint8Array(await request.arrayBuffer());
		} catch (err) {
			throw overLimit(err) ?? new ApiError(400, 'bad_body', 'the body could not be read');
		}
		if (bytes.length > rules.maxBytes) throw rules.tooLarge(bytes.length);
		return {
			name: url.searchParams.get('filename') || rules.defaultName,
			type,
			bytes,
			raw: true,
			field: (name) => url.searchParams.get(name)
		};
	}
	throw new ApiError(415, 'unsupported_media_type', rules.unsupported);
}
