/**
 * The fleet stream in the browser: every open alarm the user may see, and the
 * latest figures of each shaft once a second. One instance per tab, shared by
 * the layout (banner, tab title, tone) and the fleet overview.
 */
import { LiveStream } from './stream.svelte';
import type { AlarmChange, FleetSummary, LiveAlarm } from './types';

export class FleetLive {
	alarms = $state<LiveAlarm[]>([]);
	summary = $state<FleetSummary | null>(null);
	/** per shaft, the last few minutes of flow for the trend line: [ts, flow] */
	readonly trends = new Map<number, [number, number][]>();
	trendVersion = $state(0);
	readonly stream: LiveStream;

	constructor() {
		this.stream = new LiveStream('/api/live', {
			snapshot: (d) => (this.alarms = (d as { alarms: LiveAlarm[] }).alarms),
			alarm: (d) => {
				const { alarm } = d as AlarmChange;
				const others = this.alarms.filter((a) => a.id !== alarm.id);
				this.alarms = alarm.ended_at === null ? [alarm, ...others] : others;
			},
			fleet: (d) => this.#summary(d as FleetSummary),
			ping: () => {}
		});
	}

	#summary(s: FleetSummary) {
		this.summary = s;
		const cutoff = Date.now() - 10 * 60_000;
		for (const v of Object.values(s.vessels)) {
			for (const [id, latest] of Object.entries(v.shafts)) {
				let t = this.trends.get(Number(id));
				if (!t) this.trends.set(Number(id), (t = []));
				if (!t.length || t[t.length - 1][0] < latest.ts) t.push([latest.ts, latest.flow_lpm]);
				while (t.length && t[0][0] < cutoff) t.shift();
			}
		}
		this.trendVersion++;
	}

	/** alarms of priority 'alarm' that still want an answer */
	get unacknowledged(): LiveAlarm[] {
		return this.alarms.filter(
			(a) => a.priority === 'alarm' && (a.state === 'unacknowledged' || a.state === 'returned_unacknowledged')
		);
	}

	seedTrend(shaftId: number, points: [number, number][]) {
		const t = this.trends.get(shaftId) ?? [];
		const merged = [...points.filter((p) => !t.some((q) => q[0] === p[0])), ...t].sort((a, b) => a[0] - b[0]);
		this.trends.set(shaftId, merged);
		this.trendVersion++;
	}
}
