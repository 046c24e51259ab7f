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
