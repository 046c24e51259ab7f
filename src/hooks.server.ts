import { building } from '$app/environment';
import { json, redirect, type Handle, type HandleServerError, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { startApp } from '$lib/server/app';
import { loadConfig } from '$lib/server/config';
import { context, maybeContext } from '$lib/server/context';
import { readSession } from '$lib/server/auth/session';
import { liveToken } from '$lib/server/auth/tokens';
import { routeInScope } from '$lib/server/auth/guard';
import * as users from '$lib/server/users/repository';
import { DEMO_USERS } from '$lib/server/demo/fleet';

export const init: ServerInit = async () => {
	if (building || maybeContext()) return; // vite dev re-runs init after edits: keep what runs
	const config = loadConfig();
	const ctx = await startApp(config);
	process.once('sveltekit:shutdown', () => void ctx.stop());
	const origin = config.ORIGIN ?? `http://localhost:${process.env.PORT ?? 3000}`;
	console.log(`[aftwater] ready at ${origin}`);
	if (config.DEMO) {
		console.log(`[aftwater] demo sign-ins (password "${config.DEMO_PASSWORD}"):`);
		for (const u of DEMO_USERS) console.log(`[aftwater]   ${u.email.padEnd(18)} ${u.role}`);
	}
};

/** Paths anyone may open without signing in. */
function isPublic(path: string): boolean {
	return (
		path === '/login' ||
		path === '/api/health' ||
		path === '/api/auth/login' ||
		path.startsWith('/account/') || // invitation and password-reset links
		path.startsWith('/api/account/')
	);
}

const authenticate: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	event.locals.session = null;
	event.locals.tokenId = null;
	const { db, lucia } = context();

	const header = event.request.headers.get('authorization');
	if (header?.startsWith('Bearer ')) {
		const token = await liveToken(db, header.slice(7).trim());
		const row = token ? await users.findById(db, token.userId) : undefined;
		if (token && row && row.disabled_at === null) {
			event.locals.user = await users.toAppUser(db, row);
			event.locals.tokenId = token.tokenId;
		}
	} else {
		const { session, user } = await readSession(lucia, event.cookies, event.url);
		if (session && user && user.disabled_at === null) {
			const row = await users.findById(db, user.id);
			if (row) {
				event.locals.session = session;
				event.locals.user = await users.toAppUser(db, row);
			}
		} else if (session) {
			await lucia.invalidateSession(session.id); // a disabled account loses its sessions
		}
	}
	return resolve(event);
};

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * A page outside the caller's vessels, answered before any load or action runs (so nothing of it is
 * read): the same words as the app's own error page, with a way back, light or dark as the system is.
 */
function notFoundPage(): Response {
	const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>404 · Aftwater</title><style>
:root{color-scheme:light dark;font-family:system-ui,sans-serif;background:#f6f7f8;color:#1b1f23}
@media (prefers-color-scheme:dark){:root{background:#101418;color:#e6e9ec}a{color:#7fb6ff}}
main{max-width:36rem;margin:0 auto;padding:2rem}h1{font-size:1.5rem;font-weight:600}p{opacity:.85}</style></head>
<body><main><h1>Not found</h1><p>There is no such page, or it belongs to a vessel you are not assigned to.</p>
<p><a href="/">Back to the fleet</a></p></main></body></html>`;
	return new Response(html, { status: 404, headers: { 'content-type': 'text/html; charset=utf-8' } });
}

/**
 * A request that changes something and rides on the session cookie must come from this site.
 * SvelteKit checks the origin of form posts only; a JSON API call with no body (purge now, rotate
 * credentials, sign out) would otherwise be open to any page on the same site (another port of
 * the ship's server) that the browser sends the SameSite=Lax cookie with. Callers with an API
 * token, and programs that send no Origin, are not browsers riding a cookie.
 */
function crossSite(event: Parameters<Handle>[0]['event']): boolean {
	if (SAFE_METHODS.has(event.request.method) || !event.locals.session) return false;
	const origin = event.request.headers.get('origin');
	if (origin !== null) return origin !== event.url.origin;
	const site = event.request.headers.get('sec-fetch-site');
	return site === 'cross-site' || site === 'same-site';
}

const protect: Handle = async ({ event, resolve }) => {
	const path = event.url.pathname;
	const isApi = path.startsWith('/api/');
	const user = event.locals.user;
	if (isApi && crossSite(event)) {
		return json({ error: { code: 'forbidden', message: 'cross-site request refused' } }, { status: 403 });
	}
	if (!isPublic(path) && !user) {
		if (isApi) {
			return json({ error: { code: 'unauthorized', message: 'sign in first' } }, { status: 401 });
		}
		if (event.route.id) {
			redirect(303, `/login?next=${encodeURIComponent(path + event.url.search)}`);
		}
	}
	// Vessel scope, for every route whose path names a vessel, shaft or alarm.
	if (user && !(await routeInScope(context().db, user, event.params))) {
		if (isApi) {
			return json({ error: { code: 'not_found', message: 'not found' } }, { status: 404 });
		}
		return notFoundPage();
	}
	if (!isApi) return resolve(event);
	// the API answers in JSON throughout, also for paths and methods it does not have
	if (!event.route.id) return json({ error: { code: 'not_found', message: 'no such API route' } }, { status: 404 });
	const response = await resolve(event);
	if (response.status === 405 && !response.headers.get('content-type')?.includes('application/json')) {
		const allow = response.headers.get('allow');
		return json(
			{ error: { code: 'method_not_allowed', message: `${event.request.method} is not allowed here${allow ? `; use ${allow}` : ''}` } },
			{ status: 405, headers: allow ? { allow } : {} }
		);
	}
	return response;
};

export const handle: Handle = sequence(authenticate, protect);

export const handleError: HandleServerError = ({ error, event, status }) => {
	if (status !== 404) console.error(`[aftwater] ${event.request.method} ${event.url.pathname}:`, error);
	return { message: status === 404 ? 'Not found' : 'Something went wrong on the server', code: String(status) };
};
