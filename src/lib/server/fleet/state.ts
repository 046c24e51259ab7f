/**
 * The fleet as the overview shows it: vessels, shafts and their current state.
 * Later concerns (ingest, alarms) contribute the live parts of each shaft.
 */
import type { AppContext } from '../context';
import { listVessels } from './repository';

export async function fleetWithState(ctx: AppContext, ids: number[] | 'all') {
	return listVessels(ctx.db, ids);
}
