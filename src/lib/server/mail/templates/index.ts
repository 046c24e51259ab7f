/** Renders any kind of Aftwater e-mail from its data: the one entry point for callers. */
import { renderAlarmEscalated } from './alarm-escalated';
import { renderAlarmFlood } from './alarm-flood';
import { renderAlarmFollowup } from './alarm-followup';
import { renderAlarmRaised } from './alarm-raised';
import { renderDailyDigest } from './daily-digest';
import { renderInvitation } from './invitation';
import { renderPasswordReset } from './password-reset';
import type { MailEnv, MailRequest, RenderedMail } from './types';

export function renderMail(request: MailRequest, env: MailEnv): RenderedMail {
	switch (request.kind) {
		case 'invitation':
			return renderInvitation(request.data, env);
		case 'password_reset':
			return renderPasswordReset(request.data, env);
		case 'alarm_raised':
			return renderAlarmRaised(request.data, env);
		case 'alarm_escalated':
			return renderAlarmEscalated(request.data, env);
		case 'alarm_followup':
			return renderAlarmFollowup(request.data, env);
		case 'alarm_flood':
			return renderAlarmFlood(request.data, env);
		case 'daily_digest':
			return renderDailyDigest(request.data, env);
	}
}

export type * from './types';
export { CAUTION } from './layout';
