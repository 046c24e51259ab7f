/** A later change of an alarm (acknowledged, returned to normal), in the same thread. */
import { html } from './html';
import { alarmSubject } from './alarm-common';
import {
	alarmFacts,
	alarmUrl,
	button,
	factsHtml,
	factsText,
	formatWhen,
	htmlDocument,
	textDocument
} from './layout';
import type { AlarmFollowupData, MailEnv, RenderedMail } from './types';

export function renderAlarmFollowup(data: AlarmFollowupData, env: MailEnv): RenderedMail {
	const { alarm, recipient } = data;
	// "Re:" and the same subject keep the message in the thread in every mail client
	const subject = `Re: ${alarmSubject(alarm)}`;
	const when = formatWhen(data.at, alarm.vessel.timeZone);
	const headline =
		data.change === 'acknowledged'
			? `Acknowledged${data.by ? ` by ${data.by}` : ''}, ${when}`
			: `Returned to normal, ${when}`;
	const detail =
		data.change === 'acknowledged'
			? data.alreadyCleared
				? 'The condition had already cleared when it was acknowledged. The reading below is the latest one.'
				: 'Someone is dealing with it; the condition may still be present. You will hear again when it returns to normal.'
			: 'The condition has cleared. The reading below is the latest one.';
	const rows = alarmFacts(recipient.units, alarm, env);
	const comment = data.comment ? `Comment: ${data.comment}` : null;
	const text = textDocument([subject, headline, detail, comment, factsText(rows)]);
	const body = html`<h1 style="font-size:20px;margin:0 0 4px">${headline}</h1>
		<p>${detail}</p>
		${data.comment ? html`<blockquote style="margin:8px 0;padding:4px 12px;border-left:3px solid #cfd6dd">${data.comment}</blockquote>` : ''}
		${factsHtml(rows)}
		${button(alarmUrl(env, alarm), alarm.shaft ? 'Open the shaft' : 'Open the vessel')}`;
	return { subject, text, html: htmlDocument(subject, body) };
}
