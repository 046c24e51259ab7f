import { requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { discardImport, importTable } from '$lib/server/history/imports/service';
import { importOfPath } from '$lib/server/history/route-helpers';

/** One upload: its record, report, and the first lines of the file for the mapping step. */
export const GET = route(async (event) => {
	const ctx = context();
	const { view } = await importOfPath(ctx, event.params);
	return { import: view, table: await importTable(ctx, view) };
});

/** Discards an upload that was never imported. */
export const DELETE = route(async (event) => {
	const user = requirePermission(event, 'history.upload');
	const ctx = context();
	const { view } = await importOfPath(ctx, event.params);
	await discardImport(ctx, actorOf(user), view);
	return { ok: true };
});
