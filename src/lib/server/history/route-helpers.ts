/** Shared steps of the history routes: the shaft of the path, the import of the path. */
import { notFound } from '../api/errors';
import type { AppContext } from '../context';
import { getImport } from './imports/repository';
import { shaftHistory } from './shaft-context';

export async function shaftOfPath(ctx: AppContext, params: Partial<Record<string, string>>) {
	const h = await shaftHistory(ctx, Number(params.shaftId));
	if (!h) throw notFound('shaft');
	return h;
}

/**
 * The import named in the path, if it belongs to the shaft in the same path:
 * hooks checked the shaft's vessel, so an import of another shaft is 404 here.
 */
export async function importOfPath(ctx: AppContext, params: Partial<Record<string, string>>) {
	const h = await shaftOfPath(ctx, params);
	const view = await getImport(ctx.db, Number(params.importId));
	if (!view || view.shaft_id !== h.shaft.id) throw notFound('import');
	return { h, view };
}
