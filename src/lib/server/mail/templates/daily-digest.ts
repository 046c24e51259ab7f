/**
 * The daily digest: per vessel, the alerts of the period, how long each shaft
 * ran below its minimum (and without data), and the purges done and missed.
 */
import { formatQuantity } from '$lib/units';
import { html } from './html';
import {
	conditionLabel,
	formatDuration,
	formatWhen,
	htmlDocument,
	PRIORITY_WORDS,
	shaftUrl,
	textDocument,
	vesselUrl
} from './layout';
import { DateTime } from 'luxon';
import type { DailyDigestData, DigestAlarm, DigestVessel, MailEnv, RenderedMail } from './types';

function alarmLine(a: DigestAlarm, zone: string): string {
	const end = a.clearedAt === null ? 'still active' : `cleared ${formatWhen(a.clearedAt, zone)}`;
	const ack = a.acknowledgedBy
		? `acknowledged by ${a.acknowledgedBy}${a.acknowledgedAt ? ` ${formatWhen(a.acknowledgedAt, zone)}` : ''}`
		: 'not acknowledged';
	return `${PRIORITY_WORDS[a.priority]} · ${a.shaft ? a.shaft.name : 'whole vessel'} · ${conditionLabel(a)} · raised ${formatWhen(a.raisedAt, zone)} · ${end} · ${ack}`;
}

function vesselText(v: DigestVessel, data: DailyDigestData, env: MailEnv): string {
	const units = data.recipient.units;
	const zone = v.vessel.timeZone;
	const out = [`== ${v.vessel.name} ==  ${vesselUrl(env, v.vessel.id)}`];
	out.push(
		v.alarms.length
			? `Alerts (${v.alarms.length}):\n${v.alarms.map((a) => `- ${alarmLine(a, zone)}`).join('\n')}`
			: 'Alerts: none.'
	);
	out.push(
		`Time below minimum flow:\n${v.shafts
			.map(
				(s) =>
					`- ${s.shaft.name} (minimum ${formatQuantity(units, 'flow', s.minFlowLpm)}): ${formatDuration(s.belowMinimumMs)} below` +
					`, lowest ${formatQuantity(units, 'flow', s.lowestFlowLpm)}` +
					(s.unknownMs > 0 ? `, ${formatDuration(s.unknownMs)} without data` : '') +
					`\n  ${shaftUrl(env, v.vessel.id, s.shaft.id)}`
			)
			.join('\n')}`
	);
	const missed = v.purges.missedAt.map((t) => formatWhen(t, zone));
	out.push(
		`Purges: ${v.purges.done} done, ${v.purges.missed} missed${missed.length ? `:\n${missed.map((m) => `- ${m}`).join('\n')}` : '.'}`
	);
	return out.join('\n\n');
}

function vesselHtml(v: DigestVessel, data: DailyDigestData, env: MailEnv) {
	const units = data.recipient.units;
	const zone = v.vessel.timeZone;
	const cell = 'padding:6px 8px;border-bottom:1px solid #cfd6dd;vertical-align:top;text-align:left';
	return html`<h2 style="font-size:18px;margin:20px 0 4px">
			<a href="${vesselUrl(env, v.vessel.id)}" style="color:#15202b">${v.vessel.name}</a>
		</h2>
		<h3 style="font-size:15px;margin:12px 0 4px">Alerts (${v.alarms.length})</h3>
		${
			v.alarms.length
				? html`<ul style="margin-top:0">
						${v.alarms.map((a) => html`<li>${alarmLine(a, zone)}</li>`)}
					</ul>`
				: html`<p style="margin-top:0">None.</p>`
		}
		<h3 style="font-size:15px;margin:12px 0 4px">Time below minimum flow</h3>
		<table
			cellpadding="0"
			cellspacing="0"
			style="border-collapse:collapse;width:100%;font-size:14px"
		>
			<thead>
				<tr>
					<th style="${cell}">Shaft</th>
					<th style="${cell}">Minimum</th>
					<th style="${cell}">Below minimum</th>
					<th style="${cell}">Lowest flow</th>
					<th style="${cell}">Without data</th>
				</tr>
			</thead>
			<tbody>
				${v.shafts.map(
					(s) =>
						html`<tr>
							<td style="${cell}">
								<a href="${shaftUrl(env, v.vessel.id, s.shaft.id)}" style="color:#1f4e6e"
									>${s.shaft.name}</a
								>
							</td>
							<td style="${cell}">${formatQuantity(units, 'flow', s.minFlowLpm)}</td>
							<td style="${cell}">${formatDuration(s.belowMinimumMs)}</td>
							<td style="${cell}">${formatQuantity(units, 'flow', s.lowestFlowLpm)}</td>
							<td style="${cell}">${formatDuration(s.unknownMs)}</td>
						</tr>`
				)}
			</tbody>
		</table>
		<h3 style="font-size:15px;margin:12px 0 4px">Purges</h3>
		<p style="margin-top:0">
			${v.purges.done} done, ${v.purges.missed} missed${v.purges.missedAt.length ? ':' : '.'}
		</p>
		${
			v.purges.missedAt.length
				? html`<ul style="margin-top:0">
						${v.purges.missedAt.map((t) => html`<li>Missed ${formatWhen(t, zone)}</li>`)}
					</ul>`
				: ''
		}`;
}

export function renderDailyDigest(data: DailyDigestData, env: MailEnv): RenderedMail {
	const zone = DateTime.fromMillis(data.period.to, { zone: data.timeZone }).isValid
		? data.timeZone
		: 'UTC';
	const day = DateTime.fromMillis(data.period.to, { zone }).toFormat('yyyy-MM-dd');
	const alerts = data.vessels.reduce((n, v) => n + v.alarms.length, 0);
	const below = data.vessels.reduce(
		(n, v) => n + v.shafts.reduce((m, s) => m + s.belowMinimumMs, 0),
		0
	);
	const missed = data.vessels.reduce((n, v) => n + v.purges.missed, 0);
	const summary = [
		`${alerts} alert${alerts === 1 ? '' : 's'}`,
		`${formatDuration(below)} below minimum flow`,
		`${missed} missed purge${missed === 1 ? '' : 's'}`
	].join(', ');
	const subject = `Aftwater daily digest ${day}: ${summary}`;
	const period = `From ${formatWhen(data.period.from, zone)} to ${formatWhen(data.period.to, zone)}.`;
	const text = textDocument([
		`Hello ${data.recipient.name},`,
		`Your daily digest: ${summary}. ${period}`,
		...(data.vessels.length
			? data.vessels.map((v) => vesselText(v, data, env))
			: ['No vessels to report.'])
	]);
	const body = html`<h1 style="font-size:20px;margin:0 0 8px">Daily digest ${day}</h1>
		<p>Hello ${data.recipient.name},</p>
		<p>${summary}. ${period}</p>
		${data.vessels.length ? data.vessels.map((v) => vesselHtml(v, data, env)) : html`<p>No vessels to report.</p>`}`;
	return { subject, text, html: htmlDocument(subject, body) };
}
