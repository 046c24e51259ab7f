/** A shaft's or vessel's state at a glance, worst first. Shared by server and browser. */
import type { Priority } from '$lib/alarms/types';
import type { AlarmState } from '$lib/alarms/state-machine';

export type GlanceState = 'alarm' | 'warning' | 'caution' | 'stale' | 'normal';

/**
 * Worst first. No data ranks with the warnings it is raised as (stale_data has warning
 * priority), above a caution: a shaft nobody can see is worse than a sensor fault.
 */
export const GLANCE_RANK: Record<GlanceState, number> = { alarm: 0, warning: 1, stale: 2, caution: 3, normal: 4 };

export const GLANCE_LABELS: Record<GlanceState, string> = {
	alarm: 'Alarm',
	warning: 'Warning',
	caution: 'Caution',
	stale: 'No data',
	normal: 'Normal'
};

/** muted alarms (shelved, suppressed, out of service) are shown, but do not make a shaft red */
const ANNUNCIATED: AlarmState[] = ['unacknowledged', 'acknowledged', 'returned_unacknowledged'];

export function glanceOf(alarms: { type: string; priority: Priority; state: AlarmState }[]): GlanceState {
	let worst: GlanceState = 'normal';
	for (const a of alarms) {
		if (!ANNUNCIATED.includes(a.state)) continue;
		const g: GlanceState = a.type === 'stale_data' ? 'stale' : a.priority;
		if (GLANCE_RANK[g] < GLANCE_RANK[worst]) worst = g;
	}
	return worst;
}

export function worstOf(states: GlanceState[]): GlanceState {
	return states.reduce<GlanceState>((w, s) => (GLANCE_RANK[s] < GLANCE_RANK[w] ? s : w), 'normal');
}
