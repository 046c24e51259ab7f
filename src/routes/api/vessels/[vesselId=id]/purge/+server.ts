import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { purgeNowInput, purgeService } from '$lib/server/purge/api';

/** "Purge now": publishes a command at once and answers 201 with it (its outcome follows). */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'purge.now');
	// a bare POST (no body) asks for the schedule's duration
	const body = event.request.headers.get('content-type')
		? await readJson(event.request, purgeNowInput)
		: purgeNowInput.parse({});
	const command = await purgeService(context()).purgeNow(
		Number(event.params.vesselId),
		actorOf(user),
		body.duration_s
	);
	return json({ command }, { status: 201 });
});
