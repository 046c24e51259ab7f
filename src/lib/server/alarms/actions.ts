/** The operator's actions on an alarm, shared by the API and the pages. */
import type { AppContext } from '../context';
import { ApiError, notFound } from '../api/errors';
import type { Actor } from '../audit';
import { AlarmError } from './engine';
import type { AlarmView } from './view';

function alarms(ctx: AppContext) {
	const service = ctx.services.alarms;
	if (!service) throw new ApiError(503, 'unavailable', 'the alarm engine is not running');
	return service;
}

async function run(ctx: AppContext, id: number, action: () => Promise<AlarmView>) {
	const exists = await ctx.db.selectFrom('alarms').select('id').where('id', '=', id).executeTakeFirst();
	if (!exists) throw notFound('alarm');
	try {
		return await action();
	} catch (err) {
		if (err instanceof AlarmError) throw new ApiError(409, 'conflict', err.message);
		throw err;
	}
}

export const acknowledge = (ctx: AppContext, id: number, actor: Actor, comment: string | null) =>
	run(ctx, id, () => alarms(ctx).engine.act(id, { type: 'acknowledge', at: Date.now() }, actor, comment));

export const shelve = (ctx: AppContext, id: number, actor: Actor, durationS: number, reason: string) =>
	run(ctx, id, () => {
		const at = Date.now();
		return alarms(ctx).engine.act(id, { type: 'shelve', at, until: at + durationS * 1000 }, actor, reason);
	});

export const unshelve = (ctx: AppContext, id: number, actor: Actor, comment: string | null) =>
	run(ctx, id, () => alarms(ctx).engine.act(id, { type: 'unshelve', at: Date.now() }, actor, comment));
