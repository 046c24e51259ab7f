/** An alarm was raised: the first message of its thread, to the vessel's engineers. */
import { html } from './html';
import { alarmSubject } from './alarm-common';
import {
	alarmFacts,
	alarmUrl,
	button,
	conditionLabel,
	factsHtml,
	factsText,
	htmlDocument,
	priorityBadge,
	textDocument,
	whereText
} from './layout';
import type { AlarmRaisedData, MailEnv, RenderedMail } from './types';

export function renderAlarmRaised(data: AlarmRaisedData, env: MailEnv): RenderedMail {
	const { alarm, recipient } = data;
	const subject = alarmSubject(alarm);
	const rows = alarmFacts(recipient.units, alarm, env);
	const headline = `${conditionLabel(alarm)} on ${whereText(alarm)}`;
	const ask =
		'Check the water supply now, and acknowledge the alarm in Aftwater once someone is dealing with it.';
	const text = textDocument([`${alarmSubject(alarm)}`, factsText(rows), ask]);
	const body = html`${priorityBadge(alarm.priority)}
		<h1 style="font-size:20px;margin:12px 0 4px">${headline}</h1>
		${factsHtml(rows)}
		<p>${ask}</p>
		${button(alarmUrl(env, alarm), alarm.shaft ? 'Open the shaft' : 'Open the vessel')}`;
	return { subject, text, html: htmlDocument(subject, body) };
}
