/** Managing users: what the admin pages and the API both call. */
import { ApiError } from '../api/errors';
import { audit, type Actor } from '../audit';
import type { AppContext } from '../context';
import { hashSecret, verifySecret } from '../auth/password';
import type { UserCreate, UserUpdate } from '$lib/schemas/users';
import * as users from './repository';
import { ONBOARD_ROLES } from '$lib/types';
import { generateIdFromEntropySize } from 'lucia';
import { queueInvitation } from '../account/links';

async function checkVessels(ctx: AppContext, ids: number[]) {
	if (!ids.length) return;
	const found = await ctx.db.selectFrom('vessels').select('id').where('id', 'in', ids).execute();
	const missing = ids.filter((id) => !found.some((f) => f.id === id));
	if (missing.length) {
		throw new ApiError(422, 'invalid', `vessel_ids: no vessel ${missing.join(', ')}`, {
			vessel_ids: `no vessel ${missing.join(', ')}`
		});
	}
}

export async function createUser(ctx: AppContext, actor: Actor, input: UserCreate) {
	if (await users.findByEmail(ctx.db, input.email)) {
		throw new ApiError(409, 'conflict', `a user with e-mail ${input.email} exists`, {
			email: 'already in use'
		});
	}
	const vesselIds = [...new Set(input.vessel_ids)];
	await checkVessels(ctx, vesselIds);
	if (ONBOARD_ROLES.includes(input.role) && vesselIds.length === 0) {
		throw new ApiError(422, 'invalid', 'vessel_ids: an on-board role needs at least one vessel', {
			vessel_ids: 'an on-board role needs at least one vessel'
		});
	}
	const passwordHash = input.password ? await hashSecret(input.password) : null;
	const email = input.email.trim().toLowerCase();
	// One transaction for the user and, without a password, their invitation:
	// the e-mail is queued if and only if the user exists. The insert is
	// written here rather than through users.create(), which opens its own
	// transaction (Kysely transactions do not nest).
	const id = generateIdFromEntropySize(10);
	await ctx.db.transaction().execute(async (trx) => {
		const now = Date.now();
		await trx
			.insertInto('users')
			.values({
				id,
				email,
				name: input.name,
				role: input.role,
				password_hash: passwordHash,
				units: 'metric',
				created_at: now,
				password_changed_at: passwordHash ? now : null,
				disabled_at: null
			})
			.execute();
		if (vesselIds.length) {
			await trx
				.insertInto('vessel_members')
				.values(vesselIds.map((vessel_id) => ({ user_id: id, vessel_id })))
				.execute();
		}
		const invitationMailId = passwordHash
			? null
			: await queueInvitation(ctx, trx, { id, email, name: input.name, role: input.role }, actor);
		await audit(trx, actor, {
			action: 'user.create',
			entity: 'user',
			entityId: id,
			details: {
				email: input.email,
				role: input.role,
				vessel_ids: vesselIds,
				with_password: !!input.password,
				invitation_mail_id: invitationMailId
			}
		});
	});
	const row = await users.findById(ctx.db, id);
	return users.toAppUser(ctx.db, row!);
}

export async function updateUser(ctx: AppContext, actor: Actor, id: string, input: UserUpdate) {
	const row = await users.findById(ctx.db, id);
	if (!row) throw new ApiError(404, 'not_found', 'user not found');
	if (actor.userId === id && (input.disabled || (input.role && input.role !== row.role))) {
		throw new ApiError(409, 'conflict', 'you cannot disable yourself or change your own role');
	}
	const before = await users.toAppUser(ctx.db, row);
	const role = input.role ?? row.role;
	const vessels = input.vessel_ids ?? before.vessel_ids;
	if (ONBOARD_ROLES.includes(role) && vessels.length === 0) {
		throw new ApiError(422, 'invalid', 'vessel_ids: an on-board role needs at least one vessel', {
			vessel_ids: 'an on-board role needs at least one vessel'
		});
	}
	if (input.vessel_ids) {
		await checkVessels(ctx, input.vessel_ids);
		await users.setMemberships(ctx.db, id, [...new Set(input.vessel_ids)]);
	}
	const set: Record<string, unknown> = {};
	if (input.name !== undefined) set.name = input.name;
	if (input.role !== undefined) set.role = input.role;
	if (input.disabled !== undefined) set.disabled_at = input.disabled ? Date.now() : null;
	if (Object.keys(set).length) await ctx.db.updateTable('users').set(set).where('id', '=', id).execute();
	if (input.disabled) await ctx.lucia.invalidateUserSessions(id);
	// open live streams were checked when they opened: end them, their reconnection is checked anew
	if (input.disabled !== undefined || input.role !== undefined || input.vessel_ids) ctx.services.live?.closeUser(id);
	await audit(ctx.db, actor, {
		action: 'user.update',
		entity: 'user',
		entityId: id,
		details: { email: row.email, before: { role: before.role, vessel_ids: before.vessel_ids, disabled: row.disabled_at !== null }, change: input }
	});
	return users.toAppUser(ctx.db, (await users.findById(ctx.db, id))!);
}

/** Sets a new password and signs the user out everywhere. */
export async function setPassword(ctx: AppContext, actor: Actor, userId: string, password: string) {
	await ctx.db
		.updateTable('users')
		.set({ password_hash: await hashSecret(password), password_changed_at: Date.now() })
		.where('id', '=', userId)
		.execute();
	await ctx.lucia.invalidateUserSessions(userId);
	ctx.services.live?.closeUser(userId);
	await audit(ctx.db, actor, { action: 'user.password', entity: 'user', entityId: userId });
}

export async function changeOwnPassword(
	ctx: AppContext,
	actor: Actor,
	userId: string,
	current: string,
	next: string
) {
	const row = await users.findById(ctx.db, userId);
	// as strict as sign-in from one address: a stolen session must not be a way to guess the password
	const key = `${row?.email ?? userId}\npassword change`;
	const wait = ctx.throttles.pair.retryAfterMs(key);
	if (wait > 0) {
		throw new ApiError(429, 'throttled', `too many wrong passwords; try again in ${Math.ceil(wait / 1000)} s`, undefined, {
			'retry-after': String(Math.ceil(wait / 1000))
		});
	}
	if (!row?.password_hash || !(await verifySecret(row.password_hash, current))) {
		ctx.throttles.pair.fail(key);
		throw new ApiError(422, 'invalid', 'current_password: not your current password', {
			current_password: 'not your current password'
		});
	}
	ctx.throttles.pair.reset(key);
	await setPassword(ctx, actor, userId, next);
}
