/**
 * A vessel's separator as it reports, for the separator page: the newest ΔP and
 * purge-valve state from the vessel's SSE stream, and a call to `onChange` when
 * a purge starts or ends or an alarm changes, so the page can reload what the
 * server decided (a command's outcome, ΔP before and after).
 */
import { LiveStream } from './stream.svelte';
import { mergeSeparator, type SeparatorNow } from './separator';
import type { SeparatorTuple } from './types';

export class SeparatorLive {
	now = $state<SeparatorNow | null>(null);
	readonly stream: LiveStream;

	constructor(vesselId: number, onChange: () => void) {
		const rows = (d: unknown) => {
			this.now = mergeSeparator(this.now, (d as { separator?: SeparatorTuple[] }).separator ?? []);
		};
		this.stream = new LiveStream(`/api/vessels/${vesselId}/live?window=5`, {
			snapshot: rows,
			samples: rows,
			backfill: rows,
			purge: (d) => {
				const e = d as { state: 'open' | 'closed'; ts: number };
				if (!this.now || e.ts >= this.now.ts) {
					this.now = { ts: e.ts, dp_bar: this.now?.dp_bar ?? null, purge_valve: e.state };
				}
				onChange();
			},
			alarm: () => onChange(),
			ping: () => {}
		});
	}
}
