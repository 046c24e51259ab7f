import { readJson, route, userOf } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { getPreferences, preferencesUpdate, savePreferences } from '$lib/server/mail/preferences';

/** Your units and notification preferences. */
export const GET = route(async (event) => {
	const user = userOf(event);
	return { preferences: await getPreferences(context().db, user.id) };
});

/** Change them; fields left out keep their value. */
export const PUT = route(async (event) => {
	const user = userOf(event);
	const input = await readJson(event.request, preferencesUpdate);
	return { preferences: await savePreferences(context(), actorOf(user), user, input) };
});
