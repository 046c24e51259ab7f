/** Where to go after signing in. */

/**
 * Only a path on this site, so a crafted link cannot send a user elsewhere after sign-in.
 * Resolved the way a browser would (it reads `/\\host` and `/<tab>/host` as `//host`),
 * then kept only if it stays on this origin.
 */
export function safeNext(next: string | null, origin: string): string {
	if (!next || !next.startsWith('/')) return '/';
	let target: URL;
	try {
		target = new URL(next, origin);
	} catch {
		return '/';
	}
	return target.origin === origin ? `${target.pathname}${target.search}${target.hash}` : '/';
}
