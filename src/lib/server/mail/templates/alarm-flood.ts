/**
 * Many alarms at once (a gateway drops out, a sea chest clogs for a whole
 * vessel): one message that lists them all instead of a storm of e-mails.
 */
import { html } from './html';
import {
	alarmUrl,
	conditionLabel,
	formatWhen,
	htmlDocument,
	PRIORITY_WORDS,
	readingText,
	textDocument
} from './layout';
import { MAIL_PRIORITIES, type AlarmFloodData, type MailEnv, type RenderedMail } from './types';

const RANK = { alarm: 0, warning: 1, caution: 2 } as const;

export function renderAlarmFlood(data: AlarmFloodData, env: MailEnv): RenderedMail {
	const { recipient } = data;
	const alarms = [...data.alarms].sort(
		(a, b) => RANK[a.priority] - RANK[b.priority] || a.since - b.since || a.alarmId - b.alarmId
	);
	const top = alarms[0]?.priority ?? 'caution';
	const vessels = [...new Map(alarms.map((a) => [a.vessel.id, a.vessel.name])).values()];
	const counts = MAIL_PRIORITIES.map(
		(p) => [p, alarms.filter((a) => a.priority === p).length] as const
	)
		.filter(([, n]) => n > 0)
		.map(([p, n]) => `${n} ${PRIORITY_WORDS[p].toLowerCase()}${n === 1 ? '' : 's'}`);
	const where = vessels.length <= 2 ? vessels.join(' and ') : `${vessels.length} vessels`;
	// "alert" is the IMO umbrella word for alarms, warnings and cautions together
	const first = `[${PRIORITY_WORDS[top]}] ${alarms.length} alerts on ${where}`;
	// "Re:" and the same subject keep a follow-up in the summary's thread in every mail client
	const subject = data.followup ? `Re: ${first}` : first;
	// the window in the first vessel's zone (and UTC); each alarm below has its own vessel's
	const zone = alarms[0]?.vessel.timeZone ?? 'UTC';
	const raised = `${alarms.length} alerts were raised between ${formatWhen(data.from, zone)} and ${formatWhen(data.to, zone)}: ${counts.join(', ')}.`;
	const intro = !data.followup
		? `${raised} They are listed in one message so that none is lost in a storm of e-mails; each still needs its own acknowledgement.`
		: data.followup.change === 'acknowledged'
			? `All ${alarms.length} alerts below are acknowledged, the last at ${formatWhen(data.followup.at, zone)}. The conditions may still be present; you will hear again when they have all returned to normal.`
			: `All ${alarms.length} alerts below have returned to normal, the last at ${formatWhen(data.followup.at, zone)}. The readings are the latest ones.`;
	const heading = !data.followup
		? `${alarms.length} alerts on ${where}`
		: data.followup.change === 'acknowledged'
			? `Acknowledged: ${alarms.length} alerts on ${where}`
			: `Returned to normal: ${alarms.length} alerts on ${where}`;
	const lines = alarms.map((a) =>
		[
			`${PRIORITY_WORDS[a.priority]} · ${a.vessel.name} · ${a.shaft ? a.shaft.name : 'whole vessel'} · ${conditionLabel(a)}`,
			`  Reading: ${readingText(recipient.units, a.measured)}`,
			`  Since:   ${formatWhen(a.since, a.vessel.timeZone)}`,
			...(a.note ? [`  Note:    ${a.note}`] : []),
			`  ${alarmUrl(env, a)}`
		].join('\n')
	);
	const text = textDocument([subject, intro, lines.join('\n\n')]);
	const cell = 'padding:6px 8px;border-bottom:1px solid #cfd6dd;vertical-align:top;text-align:left';
	const body = html`<h1 style="font-size:20px;margin:0 0 8px">${heading}</h1>
		<p>${intro}</p>
		<table
			cellpadding="0"
			cellspacing="0"
			style="border-collapse:collapse;width:100%;font-size:14px"
		>
			<thead>
				<tr>
					<th style="${cell}">Priority</th>
					<th style="${cell}">Vessel · shaft</th>
					<th style="${cell}">Condition</th>
					<th style="${cell}">Reading</th>
					<th style="${cell}">Since</th>
				</tr>
			</thead>
			<tbody>
				${alarms.map(
					(a) =>
						html`<tr>
							<td style="${cell}"><strong>${PRIORITY_WORDS[a.priority]}</strong></td>
							<td style="${cell}">
								<a href="${alarmUrl(env, a)}" style="color:#1f4e6e"
									>${a.vessel.name} · ${a.shaft ? a.shaft.name : 'whole vessel'}</a
								>
							</td>
							<td style="${cell}">
								${conditionLabel(a)}${a.note ? html`<br /><small>${a.note}</small>` : ''}
							</td>
							<td style="${cell}">${readingText(recipient.units, a.measured)}</td>
							<td style="${cell}">${formatWhen(a.since, a.vessel.timeZone)}</td>
						</tr> `
				)}
			</tbody>
		</table>`;
	return { subject, text, html: htmlDocument(subject, body) };
}
