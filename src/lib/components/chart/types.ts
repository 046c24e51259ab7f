/**
 * The vocabulary of TimeChart: series over time (x in epoch ms), and what is
 * drawn over them — horizontal limits, horizontal bands, min/max envelopes,
 * and events in time (alarms, purges). Colours are named by design token, so
 * both themes and print work; state colours only for state (ISA-101).
 */

/** A design token for a line or fill: the chart reads `--aw-<tone>` (and `--aw-<tone>-bg` for fills). */
export type Tone =
	| 'chart-flow'
	| 'chart-2'
	| 'chart-3'
	| 'ink'
	| 'ink-2'
	| 'ink-3'
	| 'alarm'
	| 'warning'
	| 'caution'
	| 'stale'
	| 'ok';

export interface ChartSeries {
	label: string;
	/** shown after values in the legend */
	unit?: string;
	tone?: Tone;
	/** CSS px */
	width?: number;
	dash?: number[];
	/** decimals in the legend */
	digits?: number;
	/** draw points instead of a line (sparse data) */
	points?: boolean;
	/** not drawn as a line: only an edge of an envelope, still shown in the legend */
	edge?: boolean;
}

export interface ChartThreshold {
	value: number;
	/** drawn beside the line, e.g. "minimum 63 L/min" */
	label: string;
	tone?: Tone;
	dash?: number[];
}

/** A horizontal band between two values, e.g. the low-margin warning band. */
export interface ChartYBand {
	from: number;
	to: number;
	label: string;
	tone?: Tone;
}

/** The area between two series (indexes into the data, from 1), e.g. min and max of each bucket. */
export interface ChartEnvelope {
	upper: number;
	lower: number;
	tone?: Tone;
}

export type ChartEventKind = 'alarm' | 'warning' | 'caution' | 'purge' | 'purge_missed' | 'marker';

/** Something that happened: a vertical marker at ts, and a shaded span to `end` when it lasted. */
export interface ChartEvent {
	ts: number;
	/** end of a span (an alarm until it returned to normal); null while it lasts */
	end?: number | null;
	label: string;
	kind: ChartEventKind;
}

export const EVENT_LABELS: Record<ChartEventKind, string> = {
	alarm: 'Alarm',
	warning: 'Warning',
	caution: 'Caution',
	purge: 'Purge',
	purge_missed: 'Purge missed or valve stuck',
	marker: 'Marker'
};
