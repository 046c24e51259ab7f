/**
 * Issuing a purge command: recorded first (so even a command the broker refuses is on file, with
 * who or what asked), watched by the proof, then published at QoS 1 on the vessel's command topic
 * in the shape of the telemetry contract: {"id", "action": "purge", "duration_s"}.
 */
import { randomUUID } from 'node:crypto';
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';
import type { Actor } from '../audit';
import * as repo from './repository';
import type { CommandRow } from './repository';
import type { PurgeVerifier } from './verifier';

/** ms: a broker that has not acknowledged a QoS 1 publish by then is treated as down */
export const PUBLISH_TIMEOUT_MS = 10_000;

export interface CommandView {
	id: string;
	vessel_id: number;
	requested_at: string;
	/** an e-mail address, or "schedule" */
	requested_by: string;
	source: 'schedule' | 'manual';
	duration_s: number;
	outcome: CommandRow['outcome'];
	/** why, in the proof's words: closed_in_time, not_opened, closed_early, open_too_long, publish_failed, valve_already_open, … */
	finding: string | null;
	opened_at: string | null;
	closed_at: string | null;
	decided_at: string | null;
	dp_before_bar: number | null;
	dp_after_bar: number | null;
}

const iso = (ms: number | null) => (ms === null ? null : new Date(ms).toISOString());

export function commandView(row: CommandRow): CommandView {
	return {
		id: row.id,
		vessel_id: row.vessel_id,
		requested_at: new Date(row.requested_at).toISOString(),
		requested_by: row.requested_by,
		source: row.source,
		duration_s: row.duration_s,
		outcome: row.outcome,
		finding: row.finding,
		opened_at: iso(row.opened_at),
		closed_at: iso(row.closed_at),
		decided_at: iso(row.decided_at),
		dp_before_bar: row.dp_before_bar,
		dp_after_bar: row.dp_after_bar
	};
}

export function commandTopic(prefix: string, vesselCode: string) {
	return `${prefix}/${vesselCode}/separator/command`;
}

export class PublishError extends Error {
	constructor(
		message: string,
		readonly commandId: string
	) {
		super(message);
	}
}

export interface IssueDeps {
	db: Kysely<Database>;
	verifier: PurgeVerifier;
	prefix: string;
	publish(topic: string, payload: string): Promise<void>;
}

export interface IssueRequest {
	vesselId: number;
	vesselCode: string;
	durationS: number;
	source: 'schedule' | 'manual';
	/** for a manual purge: who asked; a scheduled one is asked by "schedule" */
	actor: Actor | null;
}

/** Records, watches and publishes a command. Throws PublishError (the row then says publish_failed). */
export async function issueCommand(deps: IssueDeps, req: IssueRequest): Promise<CommandRow> {
	const row: CommandRow = {
		id: randomUUID(),
		vessel_id: req.vesselId,
		requested_at: Date.now(),
		requested_by: req.source === 'schedule' || !req.actor ? 'schedule' : req.actor.name,
		user_id: req.source === 'manual' ? (req.actor?.userId ?? null) : null,
		source: req.source,
		duration_s: req.durationS,
		outcome: 'pending',
		finding: null,
		opened_at: null,
		closed_at: null,
		decided_at: null,
		dp_before_bar: null,
		dp_after_bar: null
	};
	await repo.insertCommand(deps.db, row);
	deps.verifier.track(row);
	const payload = JSON.stringify({ id: row.id, action: 'purge', duration_s: row.duration_s });
	let timer: NodeJS.Timeout | undefined;
	try {
		await Promise.race([
			deps.publish(commandTopic(deps.prefix, req.vesselCode), payload),
			new Promise<never>((_, reject) => {
				timer = setTimeout(
					() =>
						reject(
							new Error(`no acknowledgement from the broker within ${PUBLISH_TIMEOUT_MS / 1000} s`)
						),
					PUBLISH_TIMEOUT_MS
				);
			})
		]);
	} catch (err) {
		// a scheduled purge that never left is a missed purge; a manual one is answered to its asker
		await deps.verifier.publishFailed(row.id, req.source === 'schedule');
		throw new PublishError(err instanceof Error ? err.message : String(err), row.id);
	} finally {
		clearTimeout(timer);
	}
	return row;
}
