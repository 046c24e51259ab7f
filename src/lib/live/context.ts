import { getContext, setContext } from 'svelte';
import type { FleetLive } from './fleet-live.svelte';

const KEY = Symbol('aftwater.fleet-live');

export const provideFleetLive = (live: FleetLive) => setContext(KEY, live);
export const useFleetLive = () => getContext<FleetLive | undefined>(KEY);

/** "Corrin Bay · Port shaft" for an alarm, from the names the layout loaded */
export function whereOf(
	fleet: { id: number; name: string; shafts: { id: number; name: string }[] }[],
	a: { vessel_id: number; shaft_id: number | null }
): string {
	const v = fleet.find((x) => x.id === a.vessel_id);
	if (!v) return '';
	const s = a.shaft_id === null ? 'Separator' : (v.shafts.find((x) => x.id === a.shaft_id)?.name ?? '');
	return `${v.name} · ${s}`;
}
