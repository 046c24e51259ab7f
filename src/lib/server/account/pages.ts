/**
 * The load and action the two set-a-password pages share (reset and
 * invitation links): show the form for a live token, or say why not.
 */
import { fail, type RequestEvent } from '@sveltejs/kit';
import { z } from 'zod';
import { password } from '$lib/schemas/users';
import { fieldErrors } from '../api/errors';
import { context } from '../context';
import type { AccountTokenPurpose } from '../db/tables/mail';
import { tokenProblem, usePasswordToken, viewAccountToken } from './service';

const setPasswordForm = z
	.object({ password, confirm: z.string() })
	.refine((f) => f.password === f.confirm, {
		path: ['confirm'],
		message: 'the two passwords differ'
	});

export async function loadTokenPage(purpose: AccountTokenPurpose, token: string) {
	const view = await viewAccountToken(context(), purpose, token);
	return {
		valid: view.state === 'valid',
		email: view.email ?? null,
		name: view.name ?? null,
		problem: view.state === 'valid' ? null : tokenProblem(purpose, view.state)
	};
}

export async function setPasswordAction(purpose: AccountTokenPurpose, event: RequestEvent) {
	const form = await event.request.formData();
	const parsed = setPasswordForm.safeParse({
		password: String(form.get('password') ?? ''),
		confirm: String(form.get('confirm') ?? '')
	});
	if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error) });
	const result = await usePasswordToken(
		context(),
		purpose,
		event.params.token ?? '',
		parsed.data.password
	);
	if (!result.ok) return fail(410, { errors: { _: tokenProblem(purpose, result.state) } });
	return { done: true, email: result.email };
}
