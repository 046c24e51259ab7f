/**
 * The order in which the long-lived parts start (and, reversed, stop). Each
 * concern starts its part here and records it on ctx.services (services.ts).
 * Mail starts first so that whatever raises an alarm can already queue mail.
 */
import type { AppContext } from './context';
import type { Stoppable } from './services';
import { startTelemetry } from './ingest/service';
import { startAlarms } from './alarms/service';
import { startNotify } from './notify/service';
import { startPurge } from './purge/service';
import { LiveHub } from './live/hub';
import { startDemoSimulator } from './demo/simulator';
import { startMail } from './mail';

export async function startParts(ctx: AppContext, started: Stoppable[]): Promise<void> {
	const add = <T extends Stoppable>(part: T): T => {
		started.push(part);
		return part;
	};
	ctx.services.mail = add(await startMail(ctx));
	ctx.services.telemetry = add(await startTelemetry(ctx));
	ctx.services.alarms = add(await startAlarms(ctx));
	ctx.services.notify = add(await startNotify(ctx));
	ctx.services.purge = add(await startPurge(ctx));
	ctx.services.live = add(new LiveHub(ctx));
	const simulator = await startDemoSimulator(ctx);
	if (simulator) add(simulator);
}
