/** Nobody acknowledged in time: fleet managers are told, with who was told before them and when. */
import { html } from './html';
import { alarmSubject } from './alarm-common';
import {
	alarmFacts,
	alarmUrl,
	button,
	conditionLabel,
	factsHtml,
	factsText,
	formatDuration,
	formatWhen,
	htmlDocument,
	priorityBadge,
	textDocument,
	whereText
} from './layout';
import type { AlarmEscalatedData, MailEnv, RenderedMail } from './types';

export function renderAlarmEscalated(data: AlarmEscalatedData, env: MailEnv): RenderedMail {
	const { alarm, recipient } = data;
	const waited = formatDuration(data.escalatedAt - alarm.since);
	const subject = `${alarmSubject(alarm)} (unacknowledged for ${waited})`;
	const rows = alarmFacts(recipient.units, alarm, env);
	const zone = alarm.vessel.timeZone;
	const told = data.notified.map(
		(n) => `${n.name}${n.role ? ` (${n.role})` : ''}, ${formatWhen(n.at, zone)}`
	);
	const intro = `Nobody has acknowledged this alarm in the ${waited} since it was raised.`;
	const toldText = told.length
		? `Already told by e-mail:\n${told.map((t) => `- ${t}`).join('\n')}`
		: 'Nobody else has been told by e-mail: no one on board receives this priority.';
	const ask =
		'Please make sure someone on board is dealing with it, then acknowledge it in Aftwater.';
	const text = textDocument([subject, intro, factsText(rows), toldText, ask]);
	const body = html`${priorityBadge(alarm.priority)} <strong>Escalated</strong>
		<h1 style="font-size:20px;margin:12px 0 4px">
			${conditionLabel(alarm)} on ${whereText(alarm)}
		</h1>
		<p>${intro}</p>
		${factsHtml(rows)}
		${
			told.length
				? html`<p style="margin-bottom:4px"><strong>Already told by e-mail:</strong></p>
						<ul style="margin-top:0">
							${told.map((t) => html`<li>${t}</li>`)}
						</ul>`
				: html`<p>Nobody else has been told by e-mail: no one on board receives this priority.</p>`
		}
		<p>${ask}</p>
		${button(alarmUrl(env, alarm), alarm.shaft ? 'Open the shaft' : 'Open the vessel')}`;
	return { subject, text, html: htmlDocument(subject, body) };
}
