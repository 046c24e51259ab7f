/** Role checks for pages and form actions (API routes use api/handler.ts). */
import { error } from '@sveltejs/kit';
import { can, type Permission } from '$lib/permissions';
import type { AppUser } from '../users/repository';

export function pageUser(locals: App.Locals): AppUser {
	if (!locals.user) error(401, 'Sign in first');
	return locals.user;
}

export function pagePermission(locals: App.Locals, permission: Permission): AppUser {
	const user = pageUser(locals);
	if (!can(user.role, permission)) error(403, 'Your role may not open this page');
	return user;
}
