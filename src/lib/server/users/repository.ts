/** Users and their vessel memberships. */
import type { Kysely } from 'kysely';
import { generateIdFromEntropySize } from 'lucia';
import type { Role, UnitSystem } from '$lib/types';
import type { Database, UserRow } from '../db/schema';

export interface AppUser {
	id: string;
	email: string;
	name: string;
	role: Role;
	units: UnitSystem;
	/** vessels this user is a member of (all that matter for on-board roles) */
	vessel_ids: number[];
}

export async function findByEmail(db: Kysely<Database>, email: string) {
	return db
		.selectFrom('users')
		.selectAll()
		.where('email', '=', email.trim().toLowerCase())
		.executeTakeFirst();
}

export async function findById(db: Kysely<Database>, id: string) {
	return db.selectFrom('users').selectAll().where('id', '=', id).executeTakeFirst();
}

export async function memberships(db: Kysely<Database>, userId: string): Promise<number[]> {
	const rows = await db
		.selectFrom('vessel_members')
		.select('vessel_id')
		.where('user_id', '=', userId)
		.orderBy('vessel_id')
		.execute();
	return rows.map((r) => r.vessel_id);
}

export async function toAppUser(db: Kysely<Database>, row: UserRow): Promise<AppUser> {
	return {
		id: row.id,
		email: row.email,
		name: row.name,
		role: row.role,
		units: row.units,
		vessel_ids: await memberships(db, row.id)
	};
}

export interface CreateUser {
	email: string;
	name: string;
	role: Role;
	passwordHash: string | null;
	vesselIds: number[];
	units?: UnitSystem;
}

export async function create(db: Kysely<Database>, input: CreateUser): Promise<string> {
	const id = generateIdFromEntropySize(10);
	await db.transaction().execute(async (trx) => {
		await trx
			.insertInto('users')
			.values({
				id,
				email: input.email.trim().toLowerCase(),
				name: input.name,
				role: input.role,
				password_hash: input.passwordHash,
				units: input.units ?? 'metric',
				created_at: Date.now(),
				password_changed_at: input.passwordHash ? Date.now() : null,
				disabled_at: null
			})
			.execute();
		if (input.vesselIds.length) {
			await trx
				.insertInto('vessel_members')
				.values(input.vesselIds.map((vessel_id) => ({ user_id: id, vessel_id })))
				.execute();
		}
	});
	return id;
}

export async function setMemberships(db: Kysely<Database>, userId: string, vesselIds: number[]) {
	await db.transaction().execute(async (trx) => {
		await trx.deleteFrom('vessel_members').where('user_id', '=', userId).execute();
		if (vesselIds.length) {
			await trx
				.insertInto('vessel_members')
				.values(vesselIds.map((vessel_id) => ({ user_id: userId, vessel_id })))
				.execute();
		}
	});
}

export async function list(db: Kysely<Database>) {
	const users = await db.selectFrom('users').selectAll().orderBy('email').execute();
	const members = await db.selectFrom('vessel_members').selectAll().execute();
	return users.map((u) => ({
		id: u.id,
		email: u.email,
		name: u.name,
		role: u.role,
		units: u.units,
		disabled: u.disabled_at !== null,
		has_password: u.password_hash !== null,
		created_at: u.created_at,
		vessel_ids: members.filter((m) => m.user_id === u.id).map((m) => m.vessel_id)
	}));
}
export type UserSummary = Awaited<ReturnType<typeof list>>[number];
