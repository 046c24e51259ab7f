import { parse } from 'devalue';

/** A small HTTP client that keeps a session cookie, for API tests. */
export interface Client {
	cookie: string | null;
	request(method: string, path: string, body?: unknown, headers?: Record<string, string>): Promise<Response>;
	get(path: string): Promise<Response>;
	post(path: string, body?: unknown): Promise<Response>;
	put(path: string, body?: unknown): Promise<Response>;
	patch(path: string, body?: unknown): Promise<Response>;
	del(path: string): Promise<Response>;
}

export function client(baseUrl: string, init: { cookie?: string | null; token?: string } = {}): Client {
	const c: Client = {
		cookie: init.cookie ?? null,
		async request(method, path, body, headers = {}) {
			const h: Record<string, string> = { ...headers };
			if (c.cookie) h.cookie = c.cookie;
			if (init.token) h.authorization = `Bearer ${init.token}`;
			if (body !== undefined) h['content-type'] ??= 'application/json';
			const res = await fetch(baseUrl + path, {
				method,
				headers: h,
				body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body),
				redirect: 'manual'
			});
			const set = res.headers.getSetCookie().find((s) => s.startsWith('aftwater_session='));
			if (set) c.cookie = set.split(';')[0];
			return res;
		},
		get: (p) => c.request('GET', p),
		post: (p, b) => c.request('POST', p, b ?? {}),
		put: (p, b) => c.request('PUT', p, b ?? {}),
		patch: (p, b) => c.request('PATCH', p, b ?? {}),
		del: (p) => c.request('DELETE', p)
	};
	return c;
}

export const DEMO_PASSWORD = 'aftwater-demo';

/** Signs in through the API and returns a client holding the session. */
export async function signIn(baseUrl: string, email: string, password = DEMO_PASSWORD): Promise<Client> {
	const c = client(baseUrl);
	const res = await c.post('/api/auth/login', { email, password });
	if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${await res.text()}`);
	return c;
}

/** Form fields as a browser posts them; an array is a field sent once per value (checkboxes). */
export type FormFields = Record<string, string | string[]>;

/**
 * Posts a form to a SvelteKit form action as an enhanced form (`use:enhance`) does, so the answer
 * is JSON rather than a page. `origin` is the app's ORIGIN: SvelteKit refuses a form post whose
 * Origin header differs from it, as a cross-site request.
 */
export function postForm(
	c: Client,
	origin: string,
	path: string,
	form: URLSearchParams
): Promise<Response> {
	return c.request('POST', path, form.toString(), {
		'content-type': 'application/x-www-form-urlencoded',
		origin,
		accept: 'application/json',
		'x-sveltekit-action': 'true'
	});
}

/** SvelteKit's answer to an enhanced form post, with the action's data decoded. */
export interface ActionAnswer {
	/** HTTP status: 200 for success and failure alike, the error's status for error() */
	status: number;
	type: 'success' | 'failure' | 'redirect' | 'error';
	/** fail()'s status */
	failure?: number;
	data?: Record<string, any>;
	/** where a redirect() sends the browser */
	location?: string;
	headers: Headers;
}

/** Posts a form action (see `postForm`) and reads SvelteKit's answer. */
export async function postAction(
	c: Client,
	origin: string,
	path: string,
	fields: FormFields = {}
): Promise<ActionAnswer> {
	const form = new URLSearchParams();
	for (const [k, v] of Object.entries(fields)) for (const one of [v].flat()) form.append(k, one);
	const res = await postForm(c, origin, path, form);
	const json = await res.json();
	return {
		status: res.status,
		type: json.type,
		failure: json.type === 'failure' ? json.status : undefined,
		// the action's data is serialised with devalue, as for the browser
		data: typeof json.data === 'string' ? parse(json.data) : undefined,
		location: json.location,
		headers: res.headers
	};
}
