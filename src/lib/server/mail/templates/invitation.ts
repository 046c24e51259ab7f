/** An administrator created an account: the link sets its first password. */
import { html } from './html';
import { button, formatUtc, htmlDocument, textDocument } from './layout';
import type { InvitationData, MailEnv, RenderedMail } from './types';

export function inviteUrl(env: MailEnv, token: string): string {
	return `${env.origin}/account/invite/${encodeURIComponent(token)}`;
}

export function renderInvitation(data: InvitationData, env: MailEnv): RenderedMail {
	const url = inviteUrl(env, data.token);
	const subject = 'Your Aftwater account: set your password';
	const until = formatUtc(data.expiresAt);
	const text = textDocument([
		`Hello ${data.recipient.name},`,
		`${data.invitedBy} has given you an Aftwater account (${data.roleLabel}). Aftwater watches the clean-water supply to the stern-tube bearings of your fleet and tells you when a shaft is short of water.`,
		`Set your password here (the link works once, until ${until}):\n${url}`,
		`Your sign-in is this e-mail address. If you did not expect this message, ignore it: without a password the account cannot be used.`
	]);
	const body = html`<h1 style="font-size:20px;margin:0 0 12px">Set your password</h1>
		<p>Hello ${data.recipient.name},</p>
		<p>
			${data.invitedBy} has given you an Aftwater account (${data.roleLabel}). Aftwater watches the
			clean-water supply to the stern-tube bearings of your fleet and tells you when a shaft is
			short of water.
		</p>
		${button(url, 'Set your password')}
		<p style="font-size:13px;color:#45525f">
			The link works once, until ${until}. If the button does not work, copy this address into your
			browser:<br /><a href="${url}" style="color:#1f4e6e;word-break:break-all">${url}</a>
		</p>
		<p style="font-size:13px;color:#45525f">
			Your sign-in is this e-mail address. If you did not expect this message, ignore it: without a
			password the account cannot be used.
		</p>`;
	return { subject, text, html: htmlDocument(subject, body) };
}
