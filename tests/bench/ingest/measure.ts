/** Measuring a scenario from the server's side: event-loop delay, CPU, lag percentiles. */
import { readdirSync, readFileSync } from 'node:fs';
import { monitorEventLoopDelay, PerformanceObserver } from 'node:perf_hooks';

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/** Busy and total jiffies of all cores, from /proc/stat (null where there is none). */
function machineTicks(): { busy: number; total: number } | null {
	try {
		const line = readFileSync('/proc/stat', 'utf8').split('\n')[0];
		const f = line.trim().split(/\s+/).slice(1).map(Number);
		const idle = f[3] + (f[4] ?? 0);
		const total = f.reduce((a, b) => a + b, 0);
		return { busy: total - idle, total };
	} catch {
		return null;
	}
}

/** CPU ticks (1/100 s) used so far by each thread of this process, from /proc/self/task (empty where there is none). */
function threadTicks(): Map<string, number> {
	const out = new Map<string, number>();
	try {
		for (const tid of readdirSync('/proc/self/task')) {
			// the fields after the parenthesised name; utime and stime are fields 14 and 15 of stat(5)
			const stat = readFileSync(`/proc/self/task/${tid}/stat`, 'utf8');
			const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
			out.set(tid, Number(f[11]) + Number(f[12]));
		}
	} catch {
		// not Linux: no per-thread figures
	}
	return out;
}

export interface Window {
	/** event-loop delay of the server process (ms) */
	elP50: number;
	elP99: number;
	elMax: number;
	/** CPU of the server process (all its threads: main, writer, libuv pool), as % of one core */
	serverCpuPct: number;
	/** CPU of the whole machine, % of one core (200 % = both cores busy) */
	machineCpuPct: number | null;
	/** of the server's CPU: its main thread, and its busiest other thread (the writer) */
	mainThreadCpuPct: number | null;
	busiestThreadCpuPct: number | null;
	/** garbage-collection pauses of the main thread (ms): their sum and the longest */
	gcMs: number;
	gcMaxMs: number;
	wallMs: number;
}

/** Starts measuring now; stop() returns the figures for the window in between. */
export function startWindow() {
	const eld = monitorEventLoopDelay({ resolution: 5 }); // ms
	eld.enable();
	const cpu0 = process.cpuUsage();
	const m0 = machineTicks();
	const th0 = threadTicks();
	let gcMs = 0;
	let gcMaxMs = 0;
	const gc = new PerformanceObserver((list) => {
		for (const e of list.getEntries()) {
			gcMs += e.duration;
			gcMaxMs = Math.max(gcMaxMs, e.duration);
		}
	});
	gc.observe({ entryTypes: ['gc'] });
	const t0 = performance.now();
	return {
		stop(): Window {
			eld.disable();
			gc.disconnect();
			const wallMs = performance.now() - t0;
			const cpu = process.cpuUsage(cpu0);
			const m1 = machineTicks();
			const th1 = threadTicks();
			const ms = (ns: number) => ns / 1e6;
			const pct = (ticks: number) => ((ticks * 10) / wallMs) * 100;
			let main: number | null = null;
			let busiest: number | null = null;
			for (const [tid, ticks] of th1) {
				const d = ticks - (th0.get(tid) ?? 0);
				if (tid === String(process.pid)) main = pct(d);
				else if (busiest === null || pct(d) > busiest) busiest = pct(d);
			}
			return {
				elP50: ms(eld.percentile(50)),
				elP99: ms(eld.percentile(99)),
				elMax: ms(eld.max),
				serverCpuPct: ((cpu.user + cpu.system) / 1000 / wallMs) * 100,
				machineCpuPct:
					m0 && m1 ? ((m1.busy - m0.busy) / (m1.total - m0.total)) * 100 * cores() : null,
				mainThreadCpuPct: main,
				busiestThreadCpuPct: busiest,
				gcMs,
				gcMaxMs,
				wallMs
			};
		}
	};
}

let coreCount: number | undefined;
function cores() {
	if (coreCount === undefined) {
		try {
			coreCount =
				readFileSync('/proc/stat', 'utf8')
					.split('\n')
					.filter((l) => /^cpu\d+ /.test(l)).length || 1;
		} catch {
			coreCount = 1;
		}
	}
	return coreCount;
}

export function percentile(sorted: Float64Array, p: number): number {
	if (!sorted.length) return NaN;
	return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))];
}

/**
 * Per batch committed: when, and per shaft the highest k committed so far.
 * Messages of one shaft come over one connection in order and batches commit
 * in order, so message k of shaft g is in the first batch whose high-water
 * mark for g reaches k.
 */
export class CommitLog {
	readonly at: number[] = [];
	readonly marks: Int32Array[] = [];
	#high: Int32Array;
	writerMs = 0;
	/** samples in the committed batches, and of them newly stored (not duplicates) */
	rows = 0;
	stored = 0;
	constructor(shafts: number) {
		this.#high = new Int32Array(shafts).fill(-1);
	}
	get lastAt() {
		return this.at.length ? this.at[this.at.length - 1] : 0;
	}
	/** rows: the batch's samples (shaft_id, ts, … per `stride`); k = (ts − ts0) / 1000 */
	record(at: number, rows: Float64Array, stride: number, gOfShaftId: Int32Array, ts0: number) {
		const high = this.#high;
		for (let i = 0; i < rows.length; i += stride) {
			const g = gOfShaftId[rows[i]] ?? -1;
			const k = (rows[i + 1] - ts0) / 1000;
			if (g >= 0 && k > high[g]) high[g] = k;
		}
		this.rows += rows.length / stride;
		this.at.push(at);
		this.marks.push(high.slice());
	}

	/** publish → commit of every message sent, in ms, sorted; and how many were never committed */
	lags(sentAt: { g: number; times: Float64Array }[]): {
		sorted: Float64Array;
		uncommitted: number;
	} {
		const total = sentAt.reduce((a, s) => a + s.times.length, 0);
		const out = new Float64Array(total);
		let n = 0;
		let uncommitted = 0;
		for (const { g, times } of sentAt) {
			let b = 0;
			for (let k = 0; k < times.length; k++) {
				while (b < this.marks.length && this.marks[b][g] < k) b++;
				if (b === this.marks.length) {
					uncommitted += times.length - k;
					break;
				}
				out[n++] = this.at[b] - times[k];
			}
		}
		return { sorted: out.slice(0, n).sort(), uncommitted };
	}
}
