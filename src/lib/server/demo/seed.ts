/**
 * Seeding: the demo fleet in demo mode (idempotent: a second run changes
 * nothing), and the first administrator from ADMIN_EMAIL / ADMIN_PASSWORD.
 */
import type { Kysely } from 'kysely';
import type { Config } from '../config';
import type { Database } from '../db/schema';
import { audit, SYSTEM } from '../audit';
import { hashSecret } from '../auth/password';
import * as users from '../users/repository';
import { DEMO_USERS, DEMO_VESSELS, demoGatewayPassword, gatewayUsername } from './fleet';
import { seedDemoPurgeSchedules } from '../purge/demo';
import { seedDemoRecords } from '../records/demo';

export async function seedDemo(db: Kysely<Database>, demoPassword: string): Promise<void> {
	const vesselIds = new Map<string, number>();
	for (const v of DEMO_VESSELS) {
		let vessel = await db
			.selectFrom('vessels')
			.select('id')
			.where('code', '=', v.code)
			.executeTakeFirst();
		if (!vessel) {
			vessel = await db
				.insertInto('vessels')
				.values({
					code: v.code,
					name: v.name,
					kind: v.kind,
					time_zone: v.time_zone,
					salinity_psu: v.salinity_psu,
					created_at: Date.now()
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			await audit(db, SYSTEM, {
				action: 'vessel.create',
				entity: 'vessel',
				entityId: vessel.id,
				vesselId: vessel.id,
				details: { code: v.code, source: 'demo seed' }
			});
		}
		vesselIds.set(v.code, vessel.id);
		for (const s of v.shafts) {
			await db
				.insertInto('shafts')
				.values({ ...s, vessel_id: vessel.id, water: v.water, created_at: Date.now() })
				.onConflict((oc) => oc.columns(['vessel_id', 'code']).doNothing())
				.execute();
		}
		const gateway = await db
			.selectFrom('gateways')
			.select('vessel_id')
			.where('vessel_id', '=', vessel.id)
			.executeTakeFirst();
		if (!gateway) {
			await db
				.insertInto('gateways')
				.values({
					vessel_id: vessel.id,
					username: gatewayUsername(v.code),
					password_hash: await hashSecret(demoGatewayPassword(v.code, demoPassword)),
					issued_at: Date.now(),
					issued_by: 'demo seed'
				})
				.execute();
		}
	}

	for (const u of DEMO_USERS) {
		const existing = await users.findByEmail(db, u.email);
		if (existing) continue;
		await users.create(db, {
			email: u.email,
			name: u.name,
			role: u.role,
			passwordHash: await hashSecret(demoPassword),
			vesselIds: u.vessels.map((code) => vesselIds.get(code)!)
		});
	}
	await seedDemoPurgeSchedules(db);
	await seedDemoRecords(db);
}

/** Creates the first administrator if ADMIN_EMAIL is set and no such user exists. */
export async function seedAdmin(db: Kysely<Database>, config: Config): Promise<'created' | 'exists' | 'none'> {
	if (!config.ADMIN_EMAIL) return 'none';
	if (await users.findByEmail(db, config.ADMIN_EMAIL)) return 'exists';
	if (!config.ADMIN_PASSWORD) {
		throw new Error('ADMIN_EMAIL is set but ADMIN_PASSWORD is not: set both to create the first administrator');
	}
	const id = await users.create(db, {
		email: config.ADMIN_EMAIL,
		name: 'Administrator',
		role: 'admin',
		passwordHash: await hashSecret(config.ADMIN_PASSWORD),
		vesselIds: []
	});
	await audit(db, SYSTEM, { action: 'user.create', entity: 'user', entityId: id, details: { email: config.ADMIN_EMAIL, source: 'ADMIN_EMAIL' } });
	return 'created';
}
