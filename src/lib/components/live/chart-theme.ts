/** Reads chart colours from the design tokens, so both themes draw correctly. */
export interface ChartColours {
	ink: string;
	ink2: string;
	line: string;
	surface: string;
	flow: string;
	second: string;
	third: string;
	alarm: string;
	warning: string;
	caution: string;
	stale: string;
}

export function chartColours(): ChartColours {
	const css = getComputedStyle(document.documentElement);
	const v = (name: string) => css.getPropertyValue(name).trim();
	return {
		ink: v('--aw-ink'),
		ink2: v('--aw-ink-2'),
		line: v('--aw-line'),
		surface: v('--aw-surface'),
		flow: v('--aw-chart-flow'),
		second: v('--aw-chart-2'),
		third: v('--aw-chart-3'),
		alarm: v('--aw-alarm'),
		warning: v('--aw-warning'),
		caution: v('--aw-caution'),
		stale: v('--aw-stale')
	};
}

/** "14:03:27" in the vessel's zone, and the same instant in UTC */
export function formatInstant(ms: number, timeZone: string): { local: string; utc: string } {
	const fmt = (tz: string) =>
		new Intl.DateTimeFormat('en-GB', {
			timeZone: tz,
			hour: '2-digit',
			minute: '2-digit',
			second: '2-digit',
			hour12: false
		}).format(ms);
	return { local: fmt(timeZone), utc: fmt('UTC') };
}
