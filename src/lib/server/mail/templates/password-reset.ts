/** A password reset link: asked for by the user, or sent by an administrator. */
import { html } from './html';
import { button, formatUtc, htmlDocument, textDocument } from './layout';
import type { MailEnv, PasswordResetData, RenderedMail } from './types';

export function resetUrl(env: MailEnv, token: string): string {
	return `${env.origin}/account/reset/${encodeURIComponent(token)}`;
}

export function renderPasswordReset(data: PasswordResetData, env: MailEnv): RenderedMail {
	const url = resetUrl(env, data.token);
	const subject = 'Reset your Aftwater password';
	const until = formatUtc(data.expiresAt);
	const why = data.requestedBy
		? `${data.requestedBy}, an administrator, has sent you a link to set a new Aftwater password.`
		: 'Someone (we hope you) asked to reset the password of the Aftwater account with this e-mail address.';
	const text = textDocument([
		`Hello ${data.recipient.name},`,
		why,
		`Choose a new password here (the link works once, until ${until}):\n${url}`,
		'Setting a new password signs you out everywhere. If you did not ask for this, ignore this message: your password stays as it is.'
	]);
	const body = html`<h1 style="font-size:20px;margin:0 0 12px">Reset your password</h1>
		<p>Hello ${data.recipient.name},</p>
		<p>${why}</p>
		${button(url, 'Choose a new password')}
		<p style="font-size:13px;color:#45525f">
			The link works once, until ${until}. If the button does not work, copy this address into your
			browser:<br /><a href="${url}" style="color:#1f4e6e;word-break:break-all">${url}</a>
		</p>
		<p style="font-size:13px;color:#45525f">
			Setting a new password signs you out everywhere. If you did not ask for this, ignore this
			message: your password stays as it is.
		</p>`;
	return { subject, text, html: htmlDocument(subject, body) };
}
