import { z } from 'zod';
import { ROLES, UNIT_SYSTEMS } from '$lib/types';

export const MIN_PASSWORD_LENGTH = 12;

export const password = z
	.string()
	.min(MIN_PASSWORD_LENGTH, `at least ${MIN_PASSWORD_LENGTH} characters`)
	.max(256, 'at most 256 characters');

export const login = z.object({
	email: z.string().trim().min(1, 'required').max(254),
	password: z.string().min(1, 'required').max(256)
});

export const userCreate = z.object({
	email: z.email('an e-mail address').trim().toLowerCase().max(254),
	name: z.string().trim().min(1, 'required').max(80),
	role: z.enum(ROLES),
	vessel_ids: z.array(z.number().int().positive()).max(500).default([]),
	/** optional: without one the user is invited by e-mail to set their own */
	password: password.optional()
});
export type UserCreate = z.infer<typeof userCreate>;

export const userUpdate = z.object({
	name: z.string().trim().min(1).max(80).optional(),
	role: z.enum(ROLES).optional(),
	vessel_ids: z.array(z.number().int().positive()).max(500).optional(),
	disabled: z.boolean().optional()
});
export type UserUpdate = z.infer<typeof userUpdate>;

export const passwordChange = z.object({
	current_password: z.string().min(1, 'required').max(256),
	new_password: password
});

export const unitsUpdate = z.object({ units: z.enum(UNIT_SYSTEMS) });
