import { z } from 'zod';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { context } from '$lib/server/context';
import { previewImport } from '$lib/server/history/imports/service';
import { importOfPath } from '$lib/server/history/route-helpers';
import { importMapping } from '$lib/history/import/mapping';

/** {mapping} → what importing with it would do: first rows, row problems, counts. Imports nothing. */
export const POST = route(async (event) => {
	requirePermission(event, 'history.upload');
	const { mapping } = await readJson(event.request, z.object({ mapping: importMapping }));
	const ctx = context();
	const { h, view } = await importOfPath(ctx, event.params);
	return previewImport(ctx, h, view, mapping);
});
