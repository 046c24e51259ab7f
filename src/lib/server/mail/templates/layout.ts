/**
 * What every Aftwater e-mail shares: the caution, the frame around the HTML,
 * and the wording of times, durations, links and readings. Plain text and
 * HTML are built from the same parts so they never say different things.
 */
import { DateTime } from 'luxon';
import { formatQuantity, unitOf } from '$lib/units';
import type { UnitSystem } from '$lib/types';
import { html, type SafeHtml } from './html';
import {
	ALARM_CONDITION_LABELS,
	type AlarmFacts,
	type MailEnv,
	type MailPriority,
	type MeasuredAgainstLimit
} from './types';

export const CAUTION =
	"Aftwater supplements, and never replaces, the vessel's approved alarm and monitoring system.";

export const PRIORITY_WORDS: Record<MailPriority, string> = {
	alarm: 'ALARM',
	warning: 'WARNING',
	caution: 'CAUTION'
};

/** "2026-12-01 14:05 (Europe/Oslo, UTC+01:00) = 2026-12-01 13:05 UTC" */
export function formatWhen(ms: number, zone: string): string {
	const utcText = formatUtc(ms);
	const local = DateTime.fromMillis(ms, { zone });
	// a bad zone in the data must not lose the time: UTC alone is still right
	if (!local.isValid || local.zoneName === 'UTC') return utcText;
	return `${local.toFormat('yyyy-MM-dd HH:mm')} (${zone}, UTC${local.toFormat('ZZ')}) = ${utcText}`;
}

/** "2026-12-01 13:05 UTC" */
export function formatUtc(ms: number): string {
	return `${DateTime.fromMillis(ms, { zone: 'utc' }).toFormat('yyyy-MM-dd HH:mm')} UTC`;
}

/** "45 min", "2 h 05 min", "3 d 4 h" — rounded down to the minute. */
export function formatDuration(ms: number): string {
	const min = Math.max(0, Math.floor(ms / 60_000));
	if (min < 60) return `${min} min`;
	const h = Math.floor(min / 60);
	if (h < 24) return `${h} h ${String(min % 60).padStart(2, '0')} min`;
	return `${Math.floor(h / 24)} d ${h % 24} h`;
}

export function vesselUrl(env: MailEnv, vesselId: number): string {
	return `${env.origin}/vessels/${vesselId}`;
}

export function shaftUrl(env: MailEnv, vesselId: number, shaftId: number): string {
	return `${env.origin}/vessels/${vesselId}/shafts/${shaftId}`;
}

/** The page where the alarm's shaft (or vessel, for a vessel-wide condition) is watched. */
export function alarmUrl(env: MailEnv, alarm: AlarmFacts): string {
	return alarm.shaft
		? shaftUrl(env, alarm.vessel.id, alarm.shaft.id)
		: vesselUrl(env, alarm.vessel.id);
}

export function conditionLabel(alarm: Pick<AlarmFacts, 'condition'>): string {
	return ALARM_CONDITION_LABELS[alarm.condition] ?? alarm.condition;
}

export function whereText(alarm: AlarmFacts): string {
	return `${alarm.vessel.name} · ${alarm.shaft ? alarm.shaft.name : 'whole vessel'}`;
}

/** "12.0 L/min, minimum 63.0 L/min" in the recipient's units */
export function readingText(units: UnitSystem, m: MeasuredAgainstLimit | null): string {
	if (!m) return 'no reading for this condition';
	const value =
		m.valueSi === null
			? `no trustworthy reading (${unitOf(units, m.quantity)})`
			: formatQuantity(units, m.quantity, m.valueSi);
	return `${value}, ${m.limit} ${formatQuantity(units, m.quantity, m.limitSi)}`;
}

/** The facts every alarm message states, as label/value pairs (text and HTML alike). */
export function alarmFacts(
	units: UnitSystem,
	alarm: AlarmFacts,
	env: MailEnv
): { label: string; value: string; href?: string }[] {
	const rows: { label: string; value: string; href?: string }[] = [
		{ label: 'Priority', value: PRIORITY_WORDS[alarm.priority] },
		{ label: 'Vessel', value: alarm.vessel.name },
		{
			label: 'Shaft',
			value: alarm.shaft ? alarm.shaft.name : 'whole vessel (separator or gateway)'
		},
		{ label: 'Condition', value: conditionLabel(alarm) },
		{ label: 'Reading', value: readingText(units, alarm.measured) },
		{ label: 'Since', value: formatWhen(alarm.since, alarm.vessel.timeZone) }
	];
	if (alarm.note) rows.push({ label: 'Note', value: alarm.note });
	const url = alarmUrl(env, alarm);
	rows.push({ label: alarm.shaft ? 'Shaft page' : 'Vessel page', value: url, href: url });
	return rows;
}

export function factsText(rows: { label: string; value: string }[]): string {
	const width = Math.max(...rows.map((r) => r.label.length)) + 1;
	return rows.map((r) => `${(r.label + ':').padEnd(width + 1)}${r.value}`).join('\n');
}

export function factsHtml(rows: { label: string; value: string; href?: string }[]): SafeHtml {
	return html`<table
		role="presentation"
		cellpadding="0"
		cellspacing="0"
		style="border-collapse:collapse;margin:12px 0;width:100%"
	>
		${rows.map(
			(r) =>
				html`<tr>
					<th
						scope="row"
						style="text-align:left;vertical-align:top;padding:4px 12px 4px 0;color:#45525f;font-weight:600;white-space:nowrap"
					>
						${r.label}
					</th>
					<td style="padding:4px 0">
						${r.href ? html`<a href="${r.href}" style="color:#1f4e6e">${r.value}</a>` : r.value}
					</td>
				</tr> `
		)}
	</table>`;
}

/** A bold word and a shape for a priority: state is never told by colour alone. */
export function priorityBadge(priority: MailPriority): SafeHtml {
	const shape = { alarm: '◆', warning: '▲', caution: '●' }[priority];
	return html`<strong
		style="display:inline-block;border:2px solid #15202b;padding:2px 8px;letter-spacing:.05em"
		>${shape} ${PRIORITY_WORDS[priority]}</strong
	>`;
}

export function button(href: string, label: string): SafeHtml {
	return html`<p style="margin:20px 0">
		<a
			href="${href}"
			style="display:inline-block;background:#1f4e6e;color:#ffffff;padding:10px 18px;border-radius:6px;text-decoration:none;font-weight:600"
			>${label}</a
		>
	</p>`;
}

/** The whole HTML document: a calm single column, inline styles (mail clients drop <style>). */
export function htmlDocument(title: string, body: SafeHtml): string {
	return html`<!doctype html>
		<html lang="en">
			<head>
				<meta charset="utf-8" />
				<meta name="viewport" content="width=device-width,initial-scale=1" />
				<title>${title}</title>
			</head>
			<body
				style="margin:0;padding:0;background:#f3f5f7;color:#15202b;font-family:system-ui,-apple-system,'Segoe UI',Roboto,sans-serif;font-size:15px;line-height:1.5"
			>
				<div style="max-width:640px;margin:0 auto;padding:24px 16px">
					<p
						style="margin:0 0 16px;font-size:13px;letter-spacing:.1em;text-transform:uppercase;color:#5f6b77"
					>
						Aftwater
					</p>
					<div style="background:#ffffff;border:1px solid #cfd6dd;border-radius:6px;padding:20px">
						${body}
					</div>
					<p
						style="margin:16px 0 0;padding:8px 12px;border-left:4px solid #6f5a00;background:#fbf1c7;font-size:13px"
					>
						${CAUTION}
					</p>
				</div>
			</body>
		</html>`.value;
}

/** The plain-text body: paragraphs, then the caution. */
export function textDocument(parts: (string | null | undefined | false)[]): string {
	return [...parts.filter((p): p is string => !!p), '--', CAUTION].join('\n\n') + '\n';
}
