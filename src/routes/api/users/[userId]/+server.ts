import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { updateUser } from '$lib/server/users/service';
import { userUpdate } from '$lib/schemas/users';

export const PATCH = route(async (event) => {
	const actor = requirePermission(event, 'users.manage');
	const input = await readJson(event.request, userUpdate);
	return { user: await updateUser(context(), actorOf(actor), event.params.userId!, input) };
});
