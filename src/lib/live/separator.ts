/** The newest separator report, from what the server rendered and what the live stream brings. */
import type { SeparatorTuple } from './types';

export interface SeparatorNow {
	ts: number;
	dp_bar: number | null;
	purge_valve: 'open' | 'closed' | null;
}

/** newest of what the server rendered and what the stream has brought since */
export function mergeSeparator(base: SeparatorNow | null, rows: SeparatorTuple[]): SeparatorNow | null {
	let now = base;
	for (const [ts, dp, valve] of rows) {
		if (now && ts < now.ts) continue;
		now = {
			ts,
			dp_bar: dp ?? now?.dp_bar ?? null,
			purge_valve: valve ?? now?.purge_valve ?? null
		};
	}
	return now;
}
