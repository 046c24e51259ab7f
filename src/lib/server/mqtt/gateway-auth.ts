/**
 * Checking gateway credentials at MQTT CONNECT. The argon2 check costs tens of
 * milliseconds of CPU, so a verified (username, password) pair is remembered
 * by its SHA-256 — a reconnect storm of a hundred gateways then costs a
 * hundred hash look-ups, not a hundred argon2 runs — and concurrent checks of
 * the same pair share one run. Rotating a gateway's credentials forgets it.
 */
import { createHash } from 'node:crypto';
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import { verifySecret } from '../auth/password';

export interface GatewayIdentity {
	vesselId: number;
	vesselCode: string;
	username: string;
}

interface Entry extends GatewayIdentity {
	hash: string;
	verified: Set<string>;
	/** wrong passwords seen recently, so a retrying gateway does not burn CPU */
	refused: Map<string, number>;
}

const REFUSED_TTL_MS = 60_000;

export class GatewayAuth {
	#entries = new Map<string, Entry | null>();
	#inflight = new Map<string, Promise<boolean>>();

	constructor(private readonly db: Kysely<Database>) {}

	async verify(username: string | undefined, password: Buffer | undefined): Promise<GatewayIdentity | null> {
		if (!username || !password || username.length > 100 || password.length > 256) return null;
		const entry = await this.#entry(username);
		if (!entry) return null;
		const key = createHash('sha256').update(password).digest('hex');
		if (entry.verified.has(key)) return entry;
		const refusedAt = entry.refused.get(key);
		if (refusedAt && Date.now() - refusedAt < REFUSED_TTL_MS) return null;
		const flightKey = `${username}\0${key}`;
		let check = this.#inflight.get(flightKey);
		if (!check) {
			check = verifySecret(entry.hash, password.toString('utf8'));
			this.#inflight.set(flightKey, check);
			check.finally(() => this.#inflight.delete(flightKey));
		}
		const ok = await check;
		if (this.#entries.get(username) !== entry) return null; // rotated meanwhile
		if (ok) entry.verified.add(key);
		else {
			entry.refused.set(key, Date.now());
			if (entry.refused.size > 100) entry.refused.clear();
		}
		return ok ? entry : null;
	}

	async #entry(username: string): Promise<Entry | null> {
		if (this.#entries.has(username)) return this.#entries.get(username)!;
		const row = await this.db
			.selectFrom('gateways')
			.innerJoin('vessels', 'vessels.id', 'gateways.vessel_id')
			.select(['gateways.vessel_id', 'gateways.password_hash', 'vessels.code'])
			.where('gateways.username', '=', username)
			.executeTakeFirst();
		const entry: Entry | null = row
			? {
					vesselId: row.vessel_id,
					vesselCode: row.code,
					username,
					hash: row.password_hash,
					verified: new Set(),
					refused: new Map()
				}
			: null;
		// unknown names are remembered too (bounded), so probing costs no queries
		if (this.#entries.size > 10_000) this.#entries.clear();
		this.#entries.set(username, entry);
		return entry;
	}

	/** Forget cached checks (all, or one gateway's), after credentials change. */
	invalidate(username?: string) {
		if (username) this.#entries.delete(username);
		else this.#entries.clear();
	}
}
