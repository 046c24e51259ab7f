/**
 * Session cookies: create, validate (with sliding renewal), end. The cookie is
 * httpOnly, SameSite=Lax, and Secure whenever the site is served over https —
 * so the demo still signs in over plain http on localhost or a ship's LAN.
 */
import type { Cookies } from '@sveltejs/kit';
import type { CookieAttributes } from 'lucia';
import type { AppLucia } from './lucia';

function write(cookies: Cookies, url: URL, name: string, value: string, attrs: CookieAttributes) {
	cookies.set(name, value, {
		expires: attrs.expires,
		maxAge: attrs.maxAge,
		path: '/',
		httpOnly: true,
		sameSite: 'lax',
		secure: url.protocol === 'https:'
	});
}

export async function startSession(lucia: AppLucia, userId: string, cookies: Cookies, url: URL) {
	const session = await lucia.createSession(userId, {});
	const cookie = lucia.createSessionCookie(session.id);
	write(cookies, url, cookie.name, cookie.value, cookie.attributes);
	return session;
}

export async function readSession(lucia: AppLucia, cookies: Cookies, url: URL) {
	const id = cookies.get(lucia.sessionCookieName);
	if (!id) return { session: null, user: null };
	const result = await lucia.validateSession(id);
	if (result.session?.fresh) {
		const cookie = lucia.createSessionCookie(result.session.id);
		write(cookies, url, cookie.name, cookie.value, cookie.attributes);
	}
	if (!result.session) {
		const blank = lucia.createBlankSessionCookie();
		write(cookies, url, blank.name, blank.value, blank.attributes);
	}
	return result;
}

export async function endSession(lucia: AppLucia, sessionId: string, cookies: Cookies, url: URL) {
	await lucia.invalidateSession(sessionId);
	const blank = lucia.createBlankSessionCookie();
	write(cookies, url, blank.name, blank.value, blank.attributes);
}
