/** Times and outcomes as this page shows them (server render and browser alike). */
import type { MarkState } from '$lib/components/marks';
import { formatZoned } from '$lib/history/format';

/** "2026-12-01 14:03:07" in the given IANA zone */
export function inZone(ms: number | string | null, timeZone: string): string {
	if (ms === null) return '—';
	return formatZoned(typeof ms === 'string' ? Date.parse(ms) : ms, timeZone);
}

export type Outcome = 'pending' | 'done' | 'missed' | 'valve_stuck_open';

/** outcome → shape and word (the colour follows the shape's state, never alone) */
export const OUTCOME: Record<Outcome, { state: MarkState; label: string }> = {
	pending: { state: 'stale', label: 'Pending' },
	done: { state: 'normal', label: 'Done' },
	missed: { state: 'warning', label: 'Missed' },
	valve_stuck_open: { state: 'warning', label: 'Valve stuck open' }
};

export { FINDING } from '$lib/purge/findings';
