import { json } from '@sveltejs/kit';
import { requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { gatewayInfo, issueGatewayCredentials } from '$lib/server/fleet/service';

/** The gateway's username and when it was issued (never the password). */
export const GET = route(async (event) => {
	requirePermission(event, 'fleet.configure');
	return { gateway: (await gatewayInfo(context(), Number(event.params.vesselId))) ?? null };
});

/** Issue or rotate: the password is in this answer and nowhere else, ever. */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'fleet.configure');
	const creds = await issueGatewayCredentials(context(), actorOf(user), Number(event.params.vesselId));
	return json(creds, { status: 201, headers: { 'cache-control': 'no-store' } });
});
