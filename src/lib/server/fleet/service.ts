/** Changing the fleet's configuration: always validated, always audited. */
import { randomBytes } from 'node:crypto';
import { ApiError, notFound } from '../api/errors';
import { audit, diff, type Actor } from '../audit';
import type { AppContext } from '../context';
import { hashSecret } from '../auth/password';
import { gatewayUsername } from '../demo/fleet';
import type { ShaftCreate, ShaftUpdate, VesselCreate, VesselUpdate } from '$lib/schemas/fleet';
import type { OperatingMode } from '$lib/types';
import * as fleet from './repository';

function isUniqueViolation(err: unknown) {
	return err instanceof Error && /UNIQUE constraint failed/.test(err.message);
}

export async function createVessel(ctx: AppContext, actor: Actor, input: VesselCreate) {
	let id: number;
	try {
		id = await fleet.createVessel(ctx.db, input);
	} catch (err) {
		if (isUniqueViolation(err)) {
			throw new ApiError(409, 'conflict', `a vessel with code ${input.code} exists`, { code: 'already in use' });
		}
		throw err;
	}
	await audit(ctx.db, actor, { action: 'vessel.create', entity: 'vessel', entityId: id, vesselId: id, details: input });
	ctx.events.emit('config.changed', { vesselId: id });
	return (await fleet.getVessel(ctx.db, id))!;
}

export async function updateVessel(ctx: AppContext, actor: Actor, id: number, input: VesselUpdate) {
	const before = await fleet.getVesselRow(ctx.db, id);
	if (!before) throw notFound('vessel');
	await fleet.updateVessel(ctx.db, id, input);
	await audit(ctx.db, actor, { action: 'vessel.update', entity: 'vessel', entityId: id, vesselId: id, details: diff(before, input) });
	ctx.events.emit('config.changed', { vesselId: id });
	return (await fleet.getVessel(ctx.db, id))!;
}

export async function setOperatingMode(ctx: AppContext, actor: Actor, id: number, mode: OperatingMode, reason: string) {
	const before = await fleet.getVesselRow(ctx.db, id);
	if (!before) throw notFound('vessel');
	await fleet.setOperatingMode(ctx.db, id, mode);
	await audit(ctx.db, actor, {
		action: 'vessel.operating_mode',
		entity: 'vessel',
		entityId: id,
		vesselId: id,
		details: { from: before.operating_mode, to: mode, reason }
	});
	ctx.events.emit('config.changed', { vesselId: id });
	return (await fleet.getVessel(ctx.db, id))!;
}

export async function createShaft(ctx: AppContext, actor: Actor, vesselId: number, input: ShaftCreate) {
	let id: number;
	try {
		id = await fleet.createShaft(ctx.db, vesselId, input);
	} catch (err) {
		if (isUniqueViolation(err)) {
			throw new ApiError(409, 'conflict', `this vessel already has a shaft with code ${input.code}`, { code: 'already in use' });
		}
		throw err;
	}
	await audit(ctx.db, actor, { action: 'shaft.create', entity: 'shaft', entityId: id, vesselId, details: input });
	ctx.events.emit('config.changed', { vesselId });
	return (await fleet.getShaft(ctx.db, id))!;
}

export async function updateShaft(ctx: AppContext, actor: Actor, id: number, input: ShaftUpdate) {
	const before = await fleet.getShaft(ctx.db, id);
	if (!before) throw notFound('shaft');
	await ctx.db.transaction().execute(async (trx) => {
		await fleet.updateShaft(trx, id, input);
		const after = (await fleet.getShaft(trx, id))!;
		// a new minimum applies from now on; what was measured before stays judged by the old one
		if (after.min_flow_lpm !== before.min_flow_lpm) {
			await trx
				.insertInto('shaft_minimum_changes')
				.values({ shaft_id: id, changed_at: Date.now(), from_lpm: before.min_flow_lpm, to_lpm: after.min_flow_lpm, changed_by: actor.name })
				.onConflict((oc) => oc.columns(['shaft_id', 'changed_at']).doUpdateSet({ to_lpm: after.min_flow_lpm, changed_by: actor.name }))
				.execute();
		}
		await audit(trx, actor, { action: 'shaft.update', entity: 'shaft', entityId: id, vesselId: before.vessel_id, details: diff(before, input) });
	});
	ctx.events.emit('config.changed', { vesselId: before.vessel_id });
	return (await fleet.getShaft(ctx.db, id))!;
}

/**
 * Issues (or rotates) the vessel gateway's MQTT credentials. The password is
 * returned once and stored only as an argon2 hash; rotating it disconnects
 * the gateway at its next sign-in.
 */
export async function issueGatewayCredentials(ctx: AppContext, actor: Actor, vesselId: number) {
	const vessel = await fleet.getVesselRow(ctx.db, vesselId);
	if (!vessel) throw notFound('vessel');
	const username = gatewayUsername(vessel.code);
	const password = randomBytes(18).toString('base64url'); // 144 bits
	const row = {
		username,
		password_hash: await hashSecret(password),
		issued_at: Date.now(),
		issued_by: actor.name
	};
	const existing = await ctx.db.selectFrom('gateways').select('vessel_id').where('vessel_id', '=', vesselId).executeTakeFirst();
	if (existing) {
		await ctx.db.updateTable('gateways').set(row).where('vessel_id', '=', vesselId).execute();
	} else {
		await ctx.db.insertInto('gateways').values({ ...row, vessel_id: vesselId }).execute();
	}
	await audit(ctx.db, actor, {
		action: existing ? 'gateway.rotate' : 'gateway.issue',
		entity: 'gateway',
		entityId: vesselId,
		vesselId,
		details: { username }
	});
	ctx.events.emit('gateway.changed', { vesselId, username });
	return { username, password, issued_at: row.issued_at };
}

export async function gatewayInfo(ctx: AppContext, vesselId: number) {
	return ctx.db
		.selectFrom('gateways')
		.select(['username', 'issued_at', 'issued_by'])
		.where('vessel_id', '=', vesselId)
		.executeTakeFirst();
}
