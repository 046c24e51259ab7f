import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import * as users from '$lib/server/users/repository';
import { createUser } from '$lib/server/users/service';
import { userCreate } from '$lib/schemas/users';

export const GET = route(async (event) => {
	requirePermission(event, 'users.manage');
	return { users: await users.list(context().db) };
});

export const POST = route(async (event) => {
	const actor = requirePermission(event, 'users.manage');
	const input = await readJson(event.request, userCreate);
	const user = await createUser(context(), actorOf(actor), input);
	return json({ user }, { status: 201 });
});
