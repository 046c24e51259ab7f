/**
 * Vessel scope: which vessels a user may see. Checked once per request in
 * hooks for every route with a vessel, shaft or alarm in its path; outside the
 * scope the answer is 404, so a caller learns nothing of another vessel.
 */
import type { Kysely } from 'kysely';
import { seesWholeFleet } from '$lib/permissions';
import type { Database } from '../db/schema';
import type { AppUser } from '../users/repository';

export function visibleVesselIds(user: AppUser): number[] | 'all' {
	return seesWholeFleet(user.role) ? 'all' : user.vessel_ids;
}

export function canSeeVessel(user: AppUser, vesselId: number): boolean {
	const ids = visibleVesselIds(user);
	return ids === 'all' || ids.includes(vesselId);
}

type Resolver = (db: Kysely<Database>, id: number) => Promise<number | undefined>;

/**
 * Route parameters that name something belonging to a vessel, and how to find
 * that vessel. A route that uses one of these parameter names is scope-checked
 * by hooks before its handler runs.
 */
export const SCOPE_RESOLVERS: Record<string, Resolver> = {
	vesselId: async (db, id) =>
		(await db.selectFrom('vessels').select('id').where('id', '=', id).executeTakeFirst())?.id,
	shaftId: async (db, id) =>
		(await db.selectFrom('shafts').select('vessel_id').where('id', '=', id).executeTakeFirst())
			?.vessel_id,
	alarmId: async (db, id) =>
		(await db.selectFrom('alarms').select('vessel_id').where('id', '=', id).executeTakeFirst())
			?.vessel_id
};

export function registerScope(param: string, resolver: Resolver) {
	SCOPE_RESOLVERS[param] = resolver;
}

/**
 * Checks every scoped parameter of a route. Returns false when any of them is
 * missing, belongs to a vessel the user may not see, or belongs to another
 * vessel than the route's other parameters (/vessels/1/shafts/7 with shaft 7
 * on vessel 2 names nothing, so a form action there cannot act on either).
 */
export async function routeInScope(
	db: Kysely<Database>,
	user: AppUser,
	params: Partial<Record<string, string>>
): Promise<boolean> {
	let routeVessel: number | undefined;
	for (const [name, value] of Object.entries(params)) {
		const resolve = SCOPE_RESOLVERS[name];
		if (!resolve || value === undefined) continue;
		const id = Number(value);
		if (!Number.isSafeInteger(id)) return false;
		const vesselId = await resolve(db, id);
		if (vesselId === undefined || !canSeeVessel(user, vesselId)) return false;
		if (routeVessel !== undefined && vesselId !== routeVessel) return false;
		routeVessel = vesselId;
	}
	return true;
}
