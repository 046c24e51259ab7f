/**
 * The separator command a gateway obeys (telemetry contract v1). Anything
 * else on the command topic is ignored with a reason, never thrown.
 */
import { z } from 'zod';

/** A purge longer than an hour is not a purge but a mistake, s */
const MAX_PURGE_S = 3_600;

export const purgeCommandSchema = z.object({
	id: z.string().min(1).max(200),
	action: z.literal('purge'),
	duration_s: z.number().positive().max(MAX_PURGE_S)
});

export type PurgeCommand = z.infer<typeof purgeCommandSchema>;

export type ParsedCommand = { ok: true; command: PurgeCommand } | { ok: false; reason: string };

export function parseCommand(payload: Buffer | string): ParsedCommand {
	let data: unknown;
	try {
		data = JSON.parse(payload.toString());
	} catch {
		return { ok: false, reason: 'not JSON' };
	}
	const parsed = purgeCommandSchema.safeParse(data);
	if (parsed.success) return { ok: true, command: parsed.data };
	const issue = parsed.error.issues[0];
	const where = issue.path.length > 0 ? issue.path.join('.') : 'body';
	return { ok: false, reason: `${where}: ${issue.message}` };
}
