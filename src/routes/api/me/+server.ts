import { route, userOf } from '$lib/server/api/handler';

export const GET = route(async (event) => ({ user: userOf(event) }));
