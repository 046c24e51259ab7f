/**
 * The order in which the long-lived parts start (and, reversed, stop). Each
 * concern starts its part here and records it on ctx.services (services.ts).
 * Mail starts first so that whatever raises an alarm can already queue mail.
 */
import type { AppContext } from './context';
import type { Stoppable } from './services';

export async function startParts(ctx: AppContext, started: Stoppable[]): Promise<void> {
	const add = <T extends Stoppable>(part: T): T => {
		started.push(part);
		return part;
	};
	void add; // each concern below uses it
	// mail:      ctx.services.mail = add(await startMail(ctx));
	// telemetry: broker, subscriber, writer (issue: telemetry)
	// alarms:    rules engine fed by ingest, stale-data timer
	// purge:     node-cron jobs per separator
	// live:      SSE fan-out hub
	// simulator: demo gateways (only when DEMO and SIMULATOR allow)
}
