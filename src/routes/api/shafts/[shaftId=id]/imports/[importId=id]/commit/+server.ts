import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { commitImport } from '$lib/server/history/imports/service';
import { importOfPath } from '$lib/server/history/route-helpers';
import { importMapping } from '$lib/history/import/mapping';

/**
 * {mapping} → imports the new rows through the ingest pipeline. 200 with the
 * record and report; 422 with the report when bad_rows is "reject" and a row is bad.
 */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'history.upload');
	const { mapping } = await readJson(event.request, z.object({ mapping: importMapping }));
	const ctx = context();
	const { h, view } = await importOfPath(ctx, event.params);
	const result = await commitImport(ctx, actorOf(user), h, view, mapping);
	if (result.outcome === 'rejected') {
		return json(
			{
				error: {
					code: 'rows_rejected',
					message: `${result.report.problems_total - result.report.rows_duplicate_in_file} row(s) are bad and bad rows are set to reject the file: nothing was imported`
				},
				import: result.import,
				report: result.report
			},
			{ status: 422 }
		);
	}
	return { import: result.import, report: result.report };
});
