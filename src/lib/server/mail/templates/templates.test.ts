/**
 * E-mail templates: every value escaped in HTML, figures in the recipient's
 * units, times in the vessel's zone and UTC, links from ORIGIN, the caution.
 * Check values: 1 US gallon = 3.785411784 L (NIST SP 811, Appendix B), so
 * 12 L/min = 3.170 gpm and 63 L/min = 16.643 gpm; Europe/Oslo is UTC+01:00 in
 * winter and UTC+02:00 in summer (IANA tz database).
 */
import { describe, expect, it } from 'vitest';
import { escapeHtml, html } from './html';
import { renderMail } from './index';
import { CAUTION, formatDuration, formatWhen } from './layout';
import type { AlarmFacts, MailRecipient, MailRequest } from './types';

const env = { origin: 'https://aftwater.example.org' };
const WINTER = Date.UTC(2026, 11, 1, 13, 5); // 2026-12-01 13:05 UTC
const SUMMER = Date.UTC(2026, 6, 1, 13, 5);

const metric: MailRecipient = { name: 'Ingrid Vass', units: 'metric' };
const us: MailRecipient = { name: 'Dale Okafor', units: 'us' };

const hostile = '<script>alert("x")</script> & \'co\'';

function lowFlow(over: Partial<AlarmFacts> = {}): AlarmFacts {
	return {
		alarmId: 42,
		priority: 'alarm',
		condition: 'low_flow',
		vessel: { id: 3, name: 'Corrin Bay', timeZone: 'Europe/Oslo' },
		shaft: { id: 7, name: 'Port shaft' },
		measured: { quantity: 'flow', valueSi: 12, limitSi: 63, limit: 'minimum' },
		since: WINTER,
		...over
	};
}

/** Every kind, with data that carries a hostile string wherever text goes in. */
function everyKind(recipient: MailRecipient): MailRequest[] {
	const alarm = lowFlow({
		vessel: { id: 3, name: `Corrin ${hostile}`, timeZone: 'Europe/Oslo' },
		shaft: { id: 7, name: `Port ${hostile}` },
		note: hostile
	});
	return [
		{
			kind: 'invitation',
			data: {
				recipient: { name: hostile },
				invitedBy: hostile,
				roleLabel: 'Chief engineer',
				token: 'tok_A-1',
				expiresAt: WINTER
			}
		},
		{
			kind: 'password_reset',
			data: {
				recipient: { name: hostile },
				token: 'tok_B-2',
				expiresAt: WINTER,
				requestedBy: hostile
			}
		},
		{ kind: 'alarm_raised', data: { recipient, alarm } },
		{
			kind: 'alarm_escalated',
			data: {
				recipient,
				alarm,
				escalatedAt: WINTER + 15 * 60_000,
				notified: [{ name: hostile, role: 'Chief engineer', at: WINTER + 60_000 }]
			}
		},
		{
			kind: 'alarm_followup',
			data: {
				recipient,
				alarm,
				change: 'acknowledged',
				at: WINTER + 5 * 60_000,
				by: hostile,
				comment: hostile
			}
		},
		{
			kind: 'alarm_flood',
			data: {
				recipient,
				alarms: [alarm, { ...alarm, alarmId: 43, priority: 'warning' }],
				from: WINTER,
				to: WINTER + 60_000
			}
		},
		{
			kind: 'daily_digest',
			data: {
				recipient,
				timeZone: 'Europe/Oslo',
				period: { from: WINTER - 86_400_000, to: WINTER },
				vessels: [
					{
						vessel: alarm.vessel,
						alarms: [
							{
								alarmId: 42,
								priority: 'alarm',
								condition: 'low_flow',
								shaft: alarm.shaft,
								raisedAt: WINTER - 3_600_000,
								clearedAt: null,
								acknowledgedBy: hostile,
								acknowledgedAt: WINTER - 3_000_000
							}
						],
						shafts: [
							{
								shaft: alarm.shaft!,
								minFlowLpm: 63,
								belowMinimumMs: 12 * 60_000,
								unknownMs: 0,
								lowestFlowLpm: 12
							}
						],
						purges: { done: 4, missed: 1, missedAt: [WINTER - 7_200_000] }
					}
				]
			}
		}
	];
}

describe('html tag', () => {
	it('escapes interpolated values but not nested html', () => {
		expect(escapeHtml(`<a href="x">'&'</a>`)).toBe(
			'&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;'
		);
		const inner = html`<b>${'<i>'}</b>`;
		expect(html`<p>${inner}${['<', html`<em>x</em>`]}${null}${false}${3}</p>`.value).toBe(
			'<p><b>&lt;i&gt;</b>&lt;<em>x</em>3</p>'
		);
	});
});

describe('every template', () => {
	for (const request of everyKind(metric)) {
		it(`${request.kind}: escapes every value, ends with the caution, links from ORIGIN`, () => {
			const mail = renderMail(request, env);
			expect(mail.subject.length).toBeGreaterThan(5);
			expect(mail.subject).not.toMatch(/[\r\n]/);
			expect(mail.html).not.toContain('<script>');
			expect(mail.html).not.toContain(`'co'`);
			expect(mail.html).toContain(
				'&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;co&#39;'
			);
			expect(mail.text).toContain(CAUTION);
			expect(mail.html).toContain(escapeHtml(CAUTION));
			const links = [...mail.html.matchAll(/href="([^"]+)"/g)].map((m) => m[1]);
			expect(links.length).toBeGreaterThan(0);
			for (const link of links) expect(link.startsWith(env.origin + '/')).toBe(true);
		});
	}

	it('alarm kinds state vessel, shaft, condition, reading, since and the shaft link', () => {
		for (const request of everyKind(metric).filter((r) => r.kind.startsWith('alarm_'))) {
			const { text, html: body } = renderMail(request, env);
			for (const part of [
				'Corrin',
				'Port',
				'Low flow',
				'12.0 L/min',
				'minimum 63.0 L/min',
				'2026-12-01 13:05 UTC'
			]) {
				expect(text, `${request.kind}: ${part}`).toContain(part);
				expect(body, `${request.kind}: ${part}`).toContain(part);
			}
			expect(text).toContain('https://aftwater.example.org/vessels/3/shafts/7');
			expect(body).toContain('href="https://aftwater.example.org/vessels/3/shafts/7"');
		}
	});
});

describe('units and times', () => {
	it('gives the reading against its minimum in metric', () => {
		const { text } = renderMail(
			{ kind: 'alarm_raised', data: { recipient: metric, alarm: lowFlow() } },
			env
		);
		expect(text).toContain('12.0 L/min, minimum 63.0 L/min');
		expect(text).not.toContain('gpm');
	});

	it('gives the reading against its minimum in US customary units', () => {
		const { text, html: body } = renderMail(
			{ kind: 'alarm_raised', data: { recipient: us, alarm: lowFlow() } },
			env
		);
		expect(text).toContain('3.2 gpm, minimum 16.6 gpm');
		expect(body).toContain('3.2 gpm, minimum 16.6 gpm');
		expect(text).not.toContain('L/min');
	});

	it('converts pressure and temperature limits too', () => {
		const dp = lowFlow({
			condition: 'separator_dp_high',
			shaft: null,
			measured: { quantity: 'pressure', valueSi: 1, limitSi: 0.8, limit: 'maximum' }
		});
		const m = renderMail(
			{ kind: 'alarm_raised', data: { recipient: metric, alarm: dp } },
			env
		).text;
		const u = renderMail({ kind: 'alarm_raised', data: { recipient: us, alarm: dp } }, env).text;
		expect(m).toContain('1.00 bar, maximum 0.80 bar');
		expect(u).toContain('14.5 psi, maximum 11.6 psi'); // 1 bar = 14.5038 psi
		expect(u).toContain('https://aftwater.example.org/vessels/3'); // a vessel-wide condition links the vessel
		expect(u).not.toContain('/shafts/');
	});

	it('states since when in the vessel zone and in UTC', () => {
		expect(formatWhen(WINTER, 'Europe/Oslo')).toBe(
			'2026-12-01 14:05 (Europe/Oslo, UTC+01:00) = 2026-12-01 13:05 UTC'
		);
		expect(formatWhen(SUMMER, 'Europe/Oslo')).toBe(
			'2026-07-01 15:05 (Europe/Oslo, UTC+02:00) = 2026-07-01 13:05 UTC'
		);
		expect(formatWhen(WINTER, 'UTC')).toBe('2026-12-01 13:05 UTC');
		expect(formatWhen(WINTER, 'Not/AZone')).toBe('2026-12-01 13:05 UTC');
		const { text } = renderMail(
			{ kind: 'alarm_raised', data: { recipient: metric, alarm: lowFlow() } },
			env
		);
		expect(text).toContain('Since:');
		expect(text).toContain('2026-12-01 14:05 (Europe/Oslo, UTC+01:00) = 2026-12-01 13:05 UTC');
	});

	it('words durations', () => {
		expect(formatDuration(59_999)).toBe('0 min');
		expect(formatDuration(45 * 60_000)).toBe('45 min');
		expect(formatDuration(125 * 60_000)).toBe('2 h 05 min');
		expect(formatDuration((3 * 24 + 4) * 3_600_000)).toBe('3 d 4 h');
	});
});

describe('threads and summaries', () => {
	it('keeps one subject across the thread of an alarm', () => {
		const alarm = lowFlow();
		const raised = renderMail({ kind: 'alarm_raised', data: { recipient: metric, alarm } }, env);
		const followup = renderMail(
			{
				kind: 'alarm_followup',
				data: { recipient: metric, alarm, change: 'returned_to_normal', at: WINTER + 600_000 }
			},
			env
		);
		expect(raised.subject).toBe('[ALARM] Corrin Bay · Port shaft: Low flow');
		expect(followup.subject).toBe(`Re: ${raised.subject}`);
		expect(followup.text).toContain('Returned to normal, 2026-12-01 14:15 (Europe/Oslo');
	});

	it('an acknowledgement after the condition cleared does not promise word of its return', () => {
		const ack = (alreadyCleared: boolean) =>
			renderMail(
				{ kind: 'alarm_followup', data: { recipient: metric, alarm: lowFlow(), change: 'acknowledged', at: WINTER + 600_000, by: 'chief@demo.test', alreadyCleared } },
				env
			).text;
		expect(ack(false)).toContain('You will hear again when it returns to normal');
		expect(ack(true)).toContain('had already cleared');
		expect(ack(true)).not.toContain('You will hear again');
	});

	it('says in an escalation who was told and when', () => {
		const { subject, text } = renderMail(
			{
				kind: 'alarm_escalated',
				data: {
					recipient: metric,
					alarm: lowFlow(),
					escalatedAt: WINTER + 15 * 60_000,
					notified: [
						{ name: 'Ingrid Vass', role: 'Chief engineer', at: WINTER + 30_000 },
						{ name: 'Tomas Reyes', role: 'Technician', at: WINTER + 30_000 }
					]
				}
			},
			env
		);
		expect(subject).toContain('unacknowledged for 15 min');
		expect(text).toContain(
			'- Ingrid Vass (Chief engineer), 2026-12-01 14:05 (Europe/Oslo, UTC+01:00) = 2026-12-01 13:05 UTC'
		);
		expect(text).toContain('- Tomas Reyes (Technician)');
	});

	it('summarises a flood in one message, highest priority first', () => {
		const alarms = [
			lowFlow({
				alarmId: 1,
				priority: 'caution',
				condition: 'water_temp_high',
				measured: { quantity: 'temperature', valueSi: 41, limitSi: 38, limit: 'maximum' }
			}),
			lowFlow({ alarmId: 2, priority: 'alarm', shaft: { id: 8, name: 'Starboard shaft' } }),
			lowFlow({ alarmId: 3, priority: 'warning', condition: 'low_flow_margin' })
		];
		const { subject, text } = renderMail(
			{ kind: 'alarm_flood', data: { recipient: us, alarms, from: WINTER, to: WINTER + 60_000 } },
			env
		);
		expect(subject).toBe('[ALARM] 3 alerts on Corrin Bay');
		expect(text).toContain('1 alarm, 1 warning, 1 caution');
		expect(text.indexOf('ALARM · Corrin Bay · Starboard shaft')).toBeLessThan(
			text.indexOf('WARNING ·')
		);
		expect(text.indexOf('WARNING ·')).toBeLessThan(text.indexOf('CAUTION ·'));
		expect(text).toContain('106 °F, maximum 100 °F'); // 41 °C = 105.8 °F, 38 °C = 100.4 °F
		expect(text).toContain('/vessels/3/shafts/8');
	});

	it('reports time below minimum and missed purges in the digest, in the reader’s units', () => {
		const [digest] = everyKind(us).filter((r) => r.kind === 'daily_digest');
		const { subject, text } = renderMail(digest, env);
		expect(subject).toBe(
			'Aftwater daily digest 2026-12-01: 1 alert, 12 min below minimum flow, 1 missed purge'
		);
		expect(text).toContain('(minimum 16.6 gpm): 12 min below, lowest 3.2 gpm');
		expect(text).toContain('Purges: 4 done, 1 missed');
		expect(text).toContain('2026-12-01 12:05 (Europe/Oslo, UTC+01:00) = 2026-12-01 11:05 UTC');
	});

	it('puts the token in the account links, and nowhere else', () => {
		const [invite, reset] = everyKind(metric);
		const i = renderMail(invite, env);
		const r = renderMail(reset, env);
		expect(i.text).toContain('https://aftwater.example.org/account/invite/tok_A-1');
		expect(r.text).toContain('https://aftwater.example.org/account/reset/tok_B-2');
		expect(i.subject).not.toContain('tok_');
		expect(r.html).toContain('href="https://aftwater.example.org/account/reset/tok_B-2"');
	});
});
