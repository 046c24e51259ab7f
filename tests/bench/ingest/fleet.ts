/**
 * The bench fleet: `vessels` vessels of `shaftsPerVessel` shafts, each vessel
 * with its gateway credentials, written straight into the database (no API,
 * no audit: this is set-up, not the thing measured).
 */
import { randomBytes } from 'node:crypto';
import type { Kysely } from 'kysely';
import type { Database } from '$lib/server/db/schema';
import { hashSecret } from '$lib/server/auth/password';
import { gatewayUsername } from '$lib/server/demo/fleet';
import { PREFIX, type ConnSpec } from './protocol';

export interface FleetPlan {
	vessels: { code: string; username: string; password: string; hash: string; shafts: string[] }[];
	shafts: number;
}

/** Credentials are hashed once per bench run (argon2 costs ≈ 30 ms each) and reused by every scenario. */
export async function planFleet(vessels: number, shaftsPerVessel: number): Promise<FleetPlan> {
	const plan = await Promise.all(
		Array.from({ length: vessels }, async (_, i) => {
			const code = `bench-${String(i).padStart(3, '0')}`;
			const password = randomBytes(18).toString('base64url');
			return {
				code,
				username: gatewayUsername(code),
				password,
				hash: await hashSecret(password),
				shafts: Array.from({ length: shaftsPerVessel }, (_, j) => `s${j + 1}`)
			};
		})
	);
	return { vessels: plan, shafts: vessels * shaftsPerVessel };
}

export interface Fleet {
	conns: ConnSpec[];
	/** shaft database id → its index g in the fleet; −1 for shafts not in the bench fleet */
	gOfShaftId: Int32Array;
}

export async function createFleet(
	db: Kysely<Database>,
	plan: FleetPlan,
	clientPrefix: string
): Promise<Fleet> {
	const now = Date.now();
	const conns: ConnSpec[] = [];
	const ids: [number, number][] = [];
	let g = 0;
	await db.transaction().execute(async (tx) => {
		for (const v of plan.vessels) {
			const { id: vesselId } = await tx
				.insertInto('vessels')
				.values({
					code: v.code,
					name: `Bench ${v.code}`,
					kind: null,
					salinity_psu: null,
					created_at: now
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			await tx
				.insertInto('gateways')
				.values({
					vessel_id: vesselId,
					username: v.username,
					password_hash: v.hash,
					issued_at: now,
					issued_by: null
				})
				.execute();
			const shafts = [];
			for (const code of v.shafts) {
				const { id } = await tx
					.insertInto('shafts')
					.values({
						vessel_id: vesselId,
						code,
						name: `Shaft ${code}`,
						diameter_mm: 600,
						created_at: now
					})
					.returning('id')
					.executeTakeFirstOrThrow();
				ids.push([id, g]);
				shafts.push({ g: g++, topic: `${PREFIX}/${v.code}/${code}/telemetry` });
			}
			conns.push({
				clientId: `${clientPrefix}-${v.code}`,
				username: v.username,
				password: v.password,
				shafts
			});
		}
	});
	const gOfShaftId = new Int32Array(Math.max(0, ...ids.map(([id]) => id)) + 1).fill(-1);
	for (const [id, gi] of ids) gOfShaftId[id] = gi;
	return { conns, gOfShaftId };
}

/** The same connections without a database (the broker-only baseline accepts anyone). */
export function fleetConns(plan: FleetPlan, clientPrefix: string): ConnSpec[] {
	let g = 0;
	return plan.vessels.map((v) => ({
		clientId: `${clientPrefix}-${v.code}`,
		username: v.username,
		password: v.password,
		shafts: v.shafts.map((code) => ({ g: g++, topic: `${PREFIX}/${v.code}/${code}/telemetry` }))
	}));
}
