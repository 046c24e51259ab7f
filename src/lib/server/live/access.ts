/**
 * What a live stream remembers of the request that opened it, so the hub can
 * end it when that credential ends: a session signed out or expired, an API
 * token revoked.
 */
import type { RequestEvent } from '@sveltejs/kit';
import { userOf } from '../api/handler';
import type { StreamAccess } from './hub';

export const sessionCredential = (sessionId: string) => `session:${sessionId}`;
export const tokenCredential = (tokenId: number) => `token:${tokenId}`;

/** The signed-in caller's access, for LiveHub.openVessel/openFleet (401 without one). */
export function streamAccess(event: RequestEvent): StreamAccess {
	const user = userOf(event);
	const { locals } = event;
	if (locals.session) {
		return {
			userId: user.id,
			credential: sessionCredential(locals.session.id),
			expiresAt: locals.session.expiresAt.getTime()
		};
	}
	if (locals.tokenId === null) throw new Error('a signed-in user with neither a session nor a token');
	return { userId: user.id, credential: tokenCredential(locals.tokenId), expiresAt: null };
}
