/**
 * API errors: JSON `{"error": {"code", "message"}}` with the right status.
 * 400 unreadable request · 401 not signed in · 403 role may not · 404 absent or
 * outside the caller's scope · 409 conflict · 422 well-formed but invalid values.
 */
import { json } from '@sveltejs/kit';
import type { z } from 'zod';

export class ApiError extends Error {
	constructor(
		readonly status: 400 | 401 | 403 | 404 | 409 | 413 | 415 | 422 | 429 | 500 | 503,
		readonly code: string,
		message: string,
		readonly fields?: Record<string, string>,
		readonly headers?: Record<string, string>
	) {
		super(message);
	}
}

export const notFound = (what = 'resource') => new ApiError(404, 'not_found', `${what} not found`);
export const forbidden = (message = 'your role may not do this') =>
	new ApiError(403, 'forbidden', message);
export const unauthorized = () => new ApiError(401, 'unauthorized', 'sign in first');

/** zod issues → {"a.b": "message"}, the field at fault first */
export function fieldErrors(error: z.ZodError): Record<string, string> {
	const fields: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? issue.path.join('.') : '_';
		fields[key] ??= issue.message;
	}
	return fields;
}

export function invalid(error: z.ZodError): ApiError {
	const fields = fieldErrors(error);
	const [first] = Object.entries(fields);
	const where = first && first[0] !== '_' ? `${first[0]}: ` : '';
	return new ApiError(422, 'invalid', `${where}${first?.[1] ?? 'invalid input'}`, fields);
}

export function errorResponse(err: ApiError): Response {
	return json(
		{ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } },
		{ status: err.status, headers: err.headers }
	);
}
