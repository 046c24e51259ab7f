/** Input shapes of the public account pages and their JSON twins. */
import { z } from 'zod';
import { password } from '$lib/schemas/users';

export const resetRequest = z.object({
	email: z.string().trim().toLowerCase().max(254).pipe(z.email('an e-mail address'))
});

export const tokenPassword = z.object({
	token: z.string().min(1, 'required').max(200),
	password
});
