/** User forms → the users service's input (the API's shapes, validated by the same schemas). */
import type { z } from 'zod';
import { fieldErrors } from '$lib/server/api/errors';
import { userCreate, userUpdate, type UserCreate, type UserUpdate } from '$lib/schemas/users';
import { ONBOARD_ROLES, type Role } from '$lib/types';
import type { Errors, Values } from '$lib/components/admin/types';

export type Parsed<T> =
	| { ok: true; data: T; values: Values; vesselIds: number[] }
	| { ok: false; values: Values; vesselIds: number[]; errors: Errors };

const text = (form: FormData, name: string) => {
	const v = form.get(name);
	return typeof v === 'string' ? v : '';
};

function vesselIds(form: FormData): number[] {
	return form
		.getAll('vessel_ids')
		.map(Number)
		.filter((n) => Number.isSafeInteger(n) && n > 0);
}

/** The service checks this for a new user but not for an edit; the form says it for both. */
function needsVessel(role: string, ids: number[], errors: Errors) {
	if (ONBOARD_ROLES.includes(role as Role) && ids.length === 0) {
		errors.vessel_ids ??=
			'an on-board role needs at least one vessel: tick the vessels they serve on';
	}
}

/** The schema's answer, with the form's own wording and rule added to its errors. */
function judged<T>(parsed: z.ZodSafeParseResult<T>, values: Values, ids: number[]): Parsed<T> {
	const errors: Errors = {};
	if (!parsed.success) Object.assign(errors, fieldErrors(parsed.error));
	if (errors.role) errors.role = 'choose a role';
	needsVessel(values.role, ids, errors);
	if (!parsed.success || Object.keys(errors).length)
		return { ok: false, values, vesselIds: ids, errors };
	return { ok: true, data: parsed.data, values, vesselIds: ids };
}

export function userCreateForm(form: FormData): Parsed<UserCreate> {
	// the password is never sent back to the page
	const values: Values = {
		email: text(form, 'email'),
		name: text(form, 'name'),
		role: text(form, 'role')
	};
	const ids = vesselIds(form);
	const password = text(form, 'password');
	const parsed = userCreate.safeParse({
		...values,
		vessel_ids: ids,
		password: password === '' ? undefined : password
	});
	return judged(parsed, values, ids);
}

export function userUpdateForm(form: FormData): Parsed<UserUpdate> {
	const values: Values = { name: text(form, 'name'), role: text(form, 'role') };
	const ids = vesselIds(form);
	return judged(userUpdate.safeParse({ ...values, vessel_ids: ids }), values, ids);
}
