/**
 * What TimeChart draws over and under uPlot's series, on its canvas:
 * horizontal bands and limits, alarm spans and event markers. Markers use
 * the shapes of StateMark.svelte (diamond alarm, triangle warning, circle
 * caution), so a printed chart or a colour-blind eye still tells them apart.
 */
import type uPlot from 'uplot';
import type { ChartEvent, ChartEventKind, ChartThreshold, ChartYBand, Tone } from './types';

export interface Palette {
	line(tone: Tone): string;
	fill(tone: Tone): string;
	font: string;
	surface: string;
}

const EVENT_TONE: Record<ChartEventKind, Tone> = {
	alarm: 'alarm',
	warning: 'warning',
	caution: 'caution',
	purge: 'ink-3',
	purge_missed: 'warning',
	marker: 'ink-2'
};

export const eventTone = (kind: ChartEventKind) => EVENT_TONE[kind];

const px = (n: number) => n * (typeof devicePixelRatio === 'number' ? devicePixelRatio : 1);

function plotBox(u: uPlot) {
	const { left, top, width, height } = u.bbox;
	return { left, top, width, height, right: left + width, bottom: top + height };
}

/** Horizontal bands (under the series). */
export function drawYBands(u: uPlot, bands: ChartYBand[], p: Palette) {
	const ctx = u.ctx;
	const b = plotBox(u);
	ctx.save();
	for (const band of bands) {
		const y1 = u.valToPos(band.to, 'y', true);
		const y2 = u.valToPos(band.from, 'y', true);
		const top = Math.max(b.top, Math.min(y1, y2));
		const bottom = Math.min(b.bottom, Math.max(y1, y2));
		if (bottom <= top) continue;
		ctx.fillStyle = p.fill(band.tone ?? 'warning');
		ctx.globalAlpha = 0.6;
		ctx.fillRect(b.left, top, b.width, bottom - top);
		ctx.globalAlpha = 1;
		ctx.fillStyle = p.line(band.tone ?? 'warning');
		ctx.font = p.font;
		ctx.textAlign = 'left';
		ctx.textBaseline = 'top';
		if (bottom - top > px(12)) ctx.fillText(band.label, b.left + px(4), top + px(2));
	}
	ctx.restore();
}

/** Horizontal limits with their label at the right end (over the series). */
export function drawThresholds(u: uPlot, thresholds: ChartThreshold[], p: Palette) {
	const ctx = u.ctx;
	const b = plotBox(u);
	ctx.save();
	ctx.font = p.font;
	for (const t of thresholds) {
		const y = Math.round(u.valToPos(t.value, 'y', true)) + 0.5;
		if (y < b.top || y > b.bottom) continue;
		const colour = p.line(t.tone ?? 'alarm');
		ctx.strokeStyle = colour;
		ctx.lineWidth = px(1.5);
		ctx.setLineDash((t.dash ?? [6, 4]).map(px));
		ctx.beginPath();
		ctx.moveTo(b.left, y);
		ctx.lineTo(b.right, y);
		ctx.stroke();
		ctx.setLineDash([]);
		const w = ctx.measureText(t.label).width;
		ctx.fillStyle = p.surface;
		ctx.fillRect(b.right - w - px(8), y - px(15), w + px(6), px(13));
		ctx.fillStyle = colour;
		ctx.textAlign = 'right';
		ctx.textBaseline = 'bottom';
		ctx.fillText(t.label, b.right - px(5), y - px(3));
	}
	ctx.restore();
}

/** Shaded spans of events that lasted (under the series); an open one runs to `now`. */
export function drawEventSpans(u: uPlot, events: ChartEvent[], p: Palette, now: number) {
	const ctx = u.ctx;
	const b = plotBox(u);
	ctx.save();
	ctx.globalAlpha = 0.45;
	for (const e of events) {
		if (e.end === undefined) continue;
		const x1 = Math.max(b.left, u.valToPos(e.ts, 'x', true));
		const x2 = Math.min(b.right, u.valToPos(e.end ?? now, 'x', true));
		if (x2 <= x1) continue;
		ctx.fillStyle = p.fill(EVENT_TONE[e.kind]);
		ctx.fillRect(x1, b.top, Math.max(px(1), x2 - x1), b.height);
	}
	ctx.restore();
}

/** The shape of a marker kind, centred on (x, y), radius r (canvas px). */
export function markerPath(kind: ChartEventKind, x: number, y: number, r: number): Path2D {
	const path = new Path2D();
	switch (kind) {
		case 'alarm':
			path.moveTo(x, y - r);
			path.lineTo(x + r, y);
			path.lineTo(x, y + r);
			path.lineTo(x - r, y);
			path.closePath();
			break;
		case 'warning':
			path.moveTo(x, y - r);
			path.lineTo(x + r, y + r * 0.8);
			path.lineTo(x - r, y + r * 0.8);
			path.closePath();
			break;
		case 'caution':
			path.arc(x, y, r * 0.85, 0, Math.PI * 2);
			break;
		case 'purge_missed':
			path.moveTo(x - r, y - r);
			path.lineTo(x + r, y + r);
			path.moveTo(x + r, y - r);
			path.lineTo(x - r, y + r);
			break;
		default:
			path.rect(x - r * 0.7, y - r * 0.7, r * 1.4, r * 1.4);
	}
	return path;
}

/** Vertical lines at each event with its marker on top (over the series). */
export function drawEventMarkers(u: uPlot, events: ChartEvent[], p: Palette) {
	const ctx = u.ctx;
	const b = plotBox(u);
	const r = px(5);
	ctx.save();
	for (const e of events) {
		const x = Math.round(u.valToPos(e.ts, 'x', true)) + 0.5;
		if (x < b.left || x > b.right) continue;
		const colour = p.line(EVENT_TONE[e.kind]);
		ctx.strokeStyle = colour;
		ctx.lineWidth = px(1);
		ctx.setLineDash(e.kind === 'purge' ? [px(2), px(3)] : []);
		ctx.beginPath();
		ctx.moveTo(x, b.top + 2 * r);
		ctx.lineTo(x, b.bottom);
		ctx.stroke();
		ctx.setLineDash([]);
		const shape = markerPath(e.kind, x, b.top + r + px(1), r);
		if (e.kind === 'purge' || e.kind === 'marker') {
			ctx.fillStyle = p.surface;
			ctx.fill(shape);
			ctx.lineWidth = px(1.5);
			ctx.stroke(shape);
		} else if (e.kind === 'purge_missed') {
			ctx.lineWidth = px(2);
			ctx.stroke(shape);
		} else {
			ctx.fillStyle = colour;
			ctx.fill(shape);
		}
	}
	ctx.restore();
}
