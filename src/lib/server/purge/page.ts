/**
 * What the separator page shows: the schedule and its next runs, the recent commands and their
 * outcomes, ΔP over the chosen range with the purges on it, ΔP before and after each purge, the
 * rate of rise between purges, and — only as a suggestion — a shorter interval.
 */
import { dpTrend, suggestInterval, type DpTrend, type IntervalSuggestion } from '$lib/purge';
import type { AppContext } from '../context';
import { notFound } from '../api/errors';
import * as repo from './repository';
import { commandView, type CommandView } from './commands';
import { readSchedule, type ScheduleView } from './schedule';

export const PAGE_RANGES_H = [6, 24, 72] as const;
export type PageRangeH = (typeof PAGE_RANGES_H)[number];
/** commands listed on the page, newest first */
const PAGE_COMMANDS = 200;

export interface SeparatorPage {
	vessel: { id: number; code: string; name: string; time_zone: string };
	schedule: ScheduleView;
	range: { from: number; to: number; hours: PageRangeH };
	commands: CommandView[];
	/** 1-minute means, epoch ms at the middle of each minute */
	dp: { at: number[]; mean_bar: number[]; min_bar: number[] };
	/** purge events (valve open → closed) in the range, epoch ms; closed_at null while open */
	valve: { opened_at: number; closed_at: number | null }[];
	trend: DpTrend;
	dp_max_bar: number;
	suggestion: IntervalSuggestion | null;
	latest: { dp_bar: number | null; purge_valve: 'open' | 'closed' | null; ts: number } | null;
	purge_pending: boolean;
}

export function pageRange(value: string | null): PageRangeH {
	const n = Number(value?.replace(/h$/, ''));
	return (PAGE_RANGES_H as readonly number[]).includes(n) ? (n as PageRangeH) : 24;
}

export async function separatorPage(
	ctx: AppContext,
	vesselId: number,
	hours: PageRangeH,
	now = Date.now()
): Promise<SeparatorPage> {
	const { db } = ctx;
	const vessel = await db
		.selectFrom('vessels')
		.select(['id', 'code', 'name', 'time_zone'])
		.where('id', '=', vesselId)
		.executeTakeFirst();
	if (!vessel) throw notFound('vessel');
	const from = now - hours * 3_600_000;
	const [schedule, rows, minutes, events] = await Promise.all([
		readSchedule(db, vesselId),
		repo.listCommands(db, vesselId, from, now, PAGE_COMMANDS),
		repo.dpMinutes(db, vesselId, from, now),
		repo.valveEvents(db, vesselId, from, now)
	]);
	const closed = events.filter((e): e is typeof e & { closed_at: number } => e.closed_at !== null);
	const trend = dpTrend(minutes, closed);
	const dpMax =
		ctx.services.alarms?.settings.forVessel(vesselId).separator_dp_max_bar ?? Number.NaN;

	// ΔP after the latest purge: measured at the purge where stored, else from the minute means
	const stored =
		rows.find((r) => r.outcome === 'done' && r.dp_after_bar !== null)?.dp_after_bar ?? null;
	const fromTrend =
		[...trend.purges].reverse().find((p) => p.dp_after_bar !== null)?.dp_after_bar ?? null;
	const dpAfter = stored ?? fromTrend;
	const suggestion =
		schedule.configured && dpAfter !== null
			? suggestInterval(
					schedule.schedule.interval_min,
					trend.intervals.map((i) => i.rate_bar_per_h),
					dpMax,
					dpAfter
				)
			: null;

	const latest = ctx.services.telemetry?.pipeline.latestSeparator.get(vesselId) ?? null;
	return {
		vessel,
		schedule,
		range: { from, to: now, hours },
		commands: rows.map(commandView),
		dp: {
			at: minutes.map((m) => m.at),
			mean_bar: minutes.map((m) => m.dp_bar),
			min_bar: minutes.map((m) => m.dp_min_bar)
		},
		valve: events.map((e) => ({ opened_at: e.opened_at, closed_at: e.closed_at })),
		trend,
		dp_max_bar: dpMax,
		suggestion,
		latest: latest
			? { dp_bar: latest.dp_bar, purge_valve: latest.purge_valve, ts: latest.ts }
			: null,
		purge_pending: ctx.services.purge?.verifier.hasPending(vesselId) ?? false
	};
}
