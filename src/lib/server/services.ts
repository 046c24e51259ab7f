/**
 * The long-lived parts of a running Aftwater, each started once by startApp()
 * and stopped in reverse order on shutdown. Each concern adds its part here.
 */
import type { MailService } from './mail';
import type { TelemetryService } from './ingest/service';
import type { AlarmService } from './alarms/service';
import type { LiveHub } from './live/hub';
import type { NotifyService } from './notify/service';
import type { PurgeService } from './purge/service';

export interface Stoppable {
	stop(): Promise<void> | void;
}

export interface Services {
	mail?: MailService;
	telemetry?: TelemetryService;
	alarms?: AlarmService;
	notify?: NotifyService;
	purge?: PurgeService;
	live?: LiveHub;
}
