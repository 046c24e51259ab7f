/**
 * One vessel's live data in the browser: per-shaft columns for the charts,
 * the separator, purge spans, open alarms and the gateway, kept to the chosen
 * window and fed by the vessel's SSE stream.
 */
import { LiveStream } from './stream.svelte';
import type { AlarmChange, GatewayState, LiveAlarm, PurgeSpan, SampleTuple, SeparatorTuple } from './types';

export interface ShaftColumns {
	ts: number[];
	flow: (number | null)[];
	supply: (number | null)[];
	temp: (number | null)[];
	rpm: (number | null)[];
}

const empty = (): ShaftColumns => ({ ts: [], flow: [], supply: [], temp: [], rpm: [] });

interface SamplesPayload {
	shafts: Record<string, SampleTuple[]>;
	separator: SeparatorTuple[];
}

export class VesselLive {
	/** bumped on every change, for charts to redraw */
	version = $state(0);
	alarms = $state<LiveAlarm[]>([]);
	gateway = $state<GatewayState | null>(null);
	purges = $state<PurgeSpan[]>([]);
	readonly shafts = new Map<number, ShaftColumns>();
	readonly separator: { ts: number[]; dp: (number | null)[] } = { ts: [], dp: [] };
	valve = $state<'open' | 'closed' | null>(null);
	readonly stream: LiveStream;

	constructor(
		readonly vesselId: number,
		public windowMs: number
	) {
		this.stream = new LiveStream(`/api/vessels/${vesselId}/live?window=${Math.round(windowMs / 60_000)}`, {
			snapshot: (d) => this.#snapshot(d as SamplesPayload & { alarms: LiveAlarm[]; gateway: GatewayState | null; purges: PurgeSpan[] }),
			samples: (d) => this.#samples(d as SamplesPayload),
			backfill: (d) => {
				const b = d as SamplesPayload & { alarms: LiveAlarm[]; gateway: GatewayState | null };
				this.#samples(b);
				this.alarms = b.alarms;
				this.gateway = b.gateway;
			},
			alarm: (d) => this.#alarm(d as AlarmChange),
			gateway: (d) => {
				const g = d as { online: boolean; at: number };
				this.gateway = { online: g.online, at: g.at, last_message_at: this.gateway?.last_message_at ?? null };
			},
			purge: (d) => this.#purge(d as { state: 'open' | 'closed'; ts: number }),
			ping: () => {}
		});
	}

	#snapshot(d: SamplesPayload & { alarms: LiveAlarm[]; gateway: GatewayState | null; purges: PurgeSpan[] }) {
		this.shafts.clear();
		this.separator.ts = [];
		this.separator.dp = [];
		this.#samples(d);
		this.alarms = d.alarms;
		this.gateway = d.gateway;
		this.purges = d.purges;
	}

	#samples(d: SamplesPayload) {
		for (const [id, rows] of Object.entries(d.shafts)) {
			let cols = this.shafts.get(Number(id));
			if (!cols) this.shafts.set(Number(id), (cols = empty()));
			for (const [ts, flow, supply, temp, rpm] of rows) {
				// in order, once: a resumed stream may repeat a few samples
				const last = cols.ts.length ? cols.ts[cols.ts.length - 1] : -Infinity;
				if (ts <= last) {
					if (cols.ts.includes(ts)) continue;
					const at = cols.ts.findIndex((t) => t > ts);
					cols.ts.splice(at, 0, ts);
					cols.flow.splice(at, 0, flow);
					cols.supply.splice(at, 0, supply);
					cols.temp.splice(at, 0, temp);
					cols.rpm.splice(at, 0, rpm);
					continue;
				}
				cols.ts.push(ts);
				cols.flow.push(flow);
				cols.supply.push(supply);
				cols.temp.push(temp);
				cols.rpm.push(rpm);
			}
		}
		for (const [ts, dp, valve] of d.separator) {
			const last = this.separator.ts.length ? this.separator.ts[this.separator.ts.length - 1] : -Infinity;
			if (dp !== null && ts > last) {
				this.separator.ts.push(ts);
				this.separator.dp.push(dp);
			}
			if (valve && ts >= last) this.valve = valve;
		}
		this.#trim();
		if (this.gateway) this.gateway = { ...this.gateway, last_message_at: Date.now() };
		this.version++;
	}

	#alarm(change: AlarmChange) {
		const others = this.alarms.filter((a) => a.id !== change.alarm.id);
		this.alarms = change.alarm.ended_at === null ? [change.alarm, ...others] : others;
	}

	#purge(e: { state: 'open' | 'closed'; ts: number }) {
		this.valve = e.state;
		if (e.state === 'open') this.purges = [...this.purges, { opened_at: e.ts, closed_at: null }];
		else {
			const open = [...this.purges].reverse().find((p) => p.closed_at === null);
			if (open) this.purges = this.purges.map((p) => (p === open ? { ...p, closed_at: e.ts } : p));
		}
		this.version++;
	}

	#trim() {
		const cutoff = Date.now() - this.windowMs - 5_000;
		for (const cols of this.shafts.values()) {
			let n = 0;
			while (n < cols.ts.length && cols.ts[n] < cutoff) n++;
			if (n) for (const k of ['ts', 'flow', 'supply', 'temp', 'rpm'] as const) cols[k].splice(0, n);
		}
		let m = 0;
		while (m < this.separator.ts.length && this.separator.ts[m] < cutoff) m++;
		if (m) {
			this.separator.ts.splice(0, m);
			this.separator.dp.splice(0, m);
		}
		if (this.purges.some((p) => p.closed_at !== null && p.closed_at < cutoff)) {
			this.purges = this.purges.filter((p) => p.closed_at === null || p.closed_at >= cutoff);
		}
	}

	latest(shaftId: number) {
		const cols = this.shafts.get(shaftId);
		if (!cols?.ts.length) return null;
		const i = cols.ts.length - 1;
		return { ts: cols.ts[i], flow_lpm: cols.flow[i]!, supply_bar: cols.supply[i], temp_c: cols.temp[i], shaft_rpm: cols.rpm[i] };
	}
}
