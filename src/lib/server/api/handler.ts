/**
 * The shape of every API route: parse, check, call a server module, answer.
 * `route()` turns thrown ApiErrors (and SvelteKit's own errors) into the JSON
 * error shape, and anything unexpected into a 500 that is logged, never leaked.
 */
import { isHttpError, json, type RequestEvent } from '@sveltejs/kit';
import type { z } from 'zod';
import { can, type Permission } from '$lib/permissions';
import type { AppUser } from '../users/repository';
import { ApiError, errorResponse, forbidden, invalid, unauthorized } from './errors';

type Handler<E extends RequestEvent> = (event: E) => Promise<Response | unknown> | Response | unknown;

export function route<E extends RequestEvent>(handler: Handler<E>) {
	return async (event: E): Promise<Response> => {
		try {
			const result = await handler(event);
			if (result instanceof Response) return result;
			return json(result ?? { ok: true });
		} catch (err) {
			if (err instanceof ApiError) return errorResponse(err);
			if (isHttpError(err)) {
				const status = err.status as ApiError['status'];
				return errorResponse(new ApiError(status, err.body.code ?? 'error', err.body.message));
			}
			console.error(`[api] ${event.request.method} ${event.url.pathname}:`, err);
			return errorResponse(new ApiError(500, 'internal', 'internal error; see the server log'));
		}
	};
}

/** The signed-in user (hooks has already answered 401 for API routes without one). */
export function userOf(event: RequestEvent): AppUser {
	if (!event.locals.user) throw unauthorized();
	return event.locals.user;
}

/** The signed-in user, if their role has `permission`; else 403. */
export function requirePermission(event: RequestEvent, permission: Permission): AppUser {
	const user = userOf(event);
	if (!can(user.role, permission)) throw forbidden();
	return user;
}

export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.output<S>> {
	const type = request.headers.get('content-type') ?? '';
	if (!type.includes('application/json')) {
		throw new ApiError(415, 'unsupported_media_type', 'send a JSON body (Content-Type: application/json)');
	}
	let body: unknown;
	try {
		body = await request.json();
	} catch {
		throw new ApiError(400, 'bad_json', 'the body is not valid JSON');
	}
	if (body === null || typeof body !== 'object' || Array.isArray(body)) {
		throw new ApiError(400, 'bad_body', 'the body must be a JSON object');
	}
	const parsed = schema.safeParse(body);
	if (!parsed.success) throw invalid(parsed.error);
	return parsed.data;
}

/** Query parameters through a schema; a bad parameter is a 400 naming it. */
export function readQuery<S extends z.ZodType>(url: URL, schema: S): z.output<S> {
	const raw = Object.fromEntries(url.searchParams);
	const parsed = schema.safeParse(raw);
	if (!parsed.success) {
		const err = invalid(parsed.error);
		throw new ApiError(400, 'bad_query', err.message, err.fields);
	}
	return parsed.data;
}
