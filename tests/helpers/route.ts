/**
 * Request events for calling a route module (a `+server.ts` handler, a load or a form action)
 * directly, in process, without a build. What hooks would put in `locals` is given here instead,
 * so hooks' vessel-scope guard is not exercised this way: the tests over HTTP cover it.
 */
import type { RequestEvent } from '@sveltejs/kit';
import type { AppUser } from '$lib/server/users/repository';

export interface RouteEventInit {
	/** POST when there is a body, GET otherwise, unless given */
	method?: string;
	/** path and query, on the ORIGIN `startTestApp` runs with */
	path?: string;
	params?: Record<string, string | number>;
	/** a body sent as JSON, with its content-type */
	json?: unknown;
	/** any other body (FormData, URLSearchParams), whose content-type the Request sets itself */
	body?: BodyInit;
	/** the signed-in user; none is signed out */
	user?: AppUser | null;
	/** the caller's address, which the throttles count by (192.0.2.0/24 is for documentation) */
	clientAddress?: string;
}

export function routeEvent(init: RouteEventInit = {}): RequestEvent {
	const url = `http://localhost:3000${init.path ?? '/api/test'}`;
	const hasBody = init.json !== undefined || init.body !== undefined;
	const request = new Request(url, {
		method: init.method ?? (hasBody ? 'POST' : 'GET'),
		headers: init.json !== undefined ? { 'content-type': 'application/json' } : undefined,
		body: init.json !== undefined ? JSON.stringify(init.json) : init.body
	});
	return {
		request,
		url: new URL(url),
		params: Object.fromEntries(Object.entries(init.params ?? {}).map(([k, v]) => [k, String(v)])),
		locals: { user: init.user ?? null, session: null, tokenId: null },
		getClientAddress: () => init.clientAddress ?? '192.0.2.1'
	} as unknown as RequestEvent;
}
