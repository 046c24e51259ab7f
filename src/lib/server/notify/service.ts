/**
 * The notification policy as one running part: the notifier on the alarm
 * store, a 1 s timer for held batches, escalations and closing incidents, and
 * a node-cron job for the daily digests.
 *
 * The notifier is set on the store before the first await: from the moment
 * startNotify is called, every stored transition passes through it. Alarms
 * stored before that (between startAlarms and here, or while Aftwater ran
 * without this part) are adopted at start-up: an open alarm with no incident
 * gets one, and one still waiting unacknowledged in view is told.
 */
import cron, { type ScheduledTask } from 'node-cron';
import type { AppContext } from '../context';
import type { Stoppable } from '../services';
import { sendDigests, type DigestSent } from './digest';
import { runPass, type PassResult } from './dispatch';
import { IncidentNotifier } from './incidents';
import { toAlarmView } from '../alarms/view';

/** 1 s: the batch hold is 5 s and escalation counts in seconds; the pass reads a few indexed rows. */
const PASS_MS = 1_000;
/** Every 15 min: a digest hour is a whole local hour, and zones are offset by 15-minute steps. */
const DIGEST_CRON = '*/15 * * * *';

export interface NotifyService extends Stoppable {
	readonly notifier: IncidentNotifier;
	/** one pass of the timer's work now, judged at `now` (tests pass a fixed clock) */
	pass(now?: number): Promise<PassResult>;
	/** sends the digests due at `now` */
	digests(now?: number): Promise<DigestSent[]>;
	stop(): Promise<void>;
}

export async function startNotify(ctx: AppContext): Promise<NotifyService> {
	const log = (message: string, err?: unknown) =>
		console.error(`[aftwater] notify: ${message}`, ...(err === undefined ? [] : [err]));
	const notifier = new IncidentNotifier(log);
	const store = ctx.services.alarms?.store;
	if (store) store.notifier = notifier;

	let running: Promise<PassResult> | null = null;
	let stopped = false;
	const pass = async (now = Date.now()): Promise<PassResult> => {
		// one pass at a time: the timer's and a caller's must not decide the same batch twice
		while (running) await running.catch(() => {});
		running = runPass(ctx.db, now, (m) => log(m));
		try {
			return await running;
		} finally {
			running = null;
		}
	};

	if (store) await adopt(ctx, notifier);

	const timer = setInterval(() => {
		if (stopped || running) return;
		pass().catch((err) => log('timer pass failed', err));
	}, PASS_MS);
	timer.unref();

	let digestRun: Promise<unknown> = Promise.resolve();
	const digests = (now = Date.now()) => {
		const run = digestRun.then(() => sendDigests(ctx.db, now));
		digestRun = run.catch(() => {});
		return run;
	};
	const task: ScheduledTask = cron.schedule(
		DIGEST_CRON,
		async () => {
			if (stopped) return;
			try {
				await digests();
			} catch (err) {
				log('digest run failed', err);
			}
		},
		{ name: 'notify:digest', noOverlap: true }
	);

	return {
		notifier,
		pass,
		digests,
		async stop() {
			if (stopped) return;
			stopped = true;
			clearInterval(timer);
			await task.destroy();
			// the notifier stays on the store: transitions stored while the alarms stop after
			// this part still queue their mail in their own transaction
			await running?.catch(() => {});
			await digestRun;
		}
	};
}

/**
 * Open alarms without an incident: passed to the notifier as if just stored,
 * each in its own transaction, so one waiting in view is told as usual.
 */
async function adopt(ctx: AppContext, notifier: IncidentNotifier) {
	const orphans = await ctx.db
		.selectFrom('alarms')
		.selectAll()
		.where('ended_at', 'is', null)
		.where((eb) =>
			eb.not(
				eb.exists(
					eb
						.selectFrom('notify_incidents')
						.select('id')
						.whereRef('notify_incidents.current_alarm_id', '=', 'alarms.id')
				)
			)
		)
		.orderBy('raised_at')
		.execute();
	for (const row of orphans) {
		const alarm = toAlarmView(row);
		await ctx.db.transaction().execute((trx) =>
			notifier.onTransition(trx, {
				alarm,
				transition: {
					event: 'adopt',
					from: null,
					to: alarm.state,
					at: Date.now(),
					userId: null,
					actor: 'system',
					value: alarm.value,
					comment: null
				}
			})
		);
	}
}
