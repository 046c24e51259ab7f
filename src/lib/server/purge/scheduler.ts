/**
 * One node-cron job per separator whose schedule is enabled: a once-a-minute task in the vessel's
 * time zone that asks `isDue`. A derived cron expression would miss a run moved by a clock change
 * and knows nothing of quiet hours ($lib/purge/describe.ts), so the minute tick is the exact way.
 *
 * Rebuilds run one at a time through a queue, and each first awaits the destruction of the job it
 * replaces, so a vessel never has two live jobs. A destroyed task that was already running when it
 * was replaced checks that it is still the vessel's job before it fires.
 */
import cron, { type ScheduledTask, type TaskContext } from 'node-cron';
import { isDue, type PurgeSchedule } from '$lib/purge';

const MS_PER_MIN = 60_000;
/** ms: a tick this late still belongs to its minute (node-cron's default of 1 s drops it under load) */
const LATE_TICK_TOLERANCE_MS = 55_000;
/** ms: a tick missed because the process stalled is still run this long after its minute */
const MAX_CATCH_UP_MS = 5 * MS_PER_MIN;

export interface JobSpec {
	vesselId: number;
	vesselCode: string;
	timeZone: string;
	schedule: PurgeSchedule;
}

export interface JobInfo extends JobSpec {
	/** node-cron task name, `purge:{vessel code}` */
	name: string;
	/** node-cron task id */
	taskId: string;
	builtAt: number;
}

interface Job extends JobInfo {
	task: ScheduledTask;
}

export interface SchedulerHooks {
	/** the vessel's schedule and time zone as stored now; undefined when it has none */
	load(vesselId: number): Promise<JobSpec | undefined>;
	/** every stored schedule */
	loadAll(): Promise<JobSpec[]>;
	/** a run is due in the minute starting at `minute` (epoch ms) */
	due(spec: JobSpec, minute: number): Promise<void>;
	log?(line: string): void;
}

export class PurgeScheduler {
	/**
	 * Fake-clock hook for tests: when set, every tick (scheduled or `runNow`) judges this instant
	 * instead of the minute node-cron fired for.
	 */
	clock: (() => number) | null = null;
	#jobs = new Map<number, Job>();
	/** vessel → the minute (epoch ms) its schedule last issued a run: once per minute, across rebuilds */
	#lastRun = new Map<number, number>();
	#queue: Promise<unknown> = Promise.resolve();
	#stopped = false;

	constructor(private readonly hooks: SchedulerHooks) {}

	/** Seeds the last run minutes (from the stored commands) so a restart inside a minute does not run it twice. */
	rememberRuns(runs: Map<number, number>) {
		for (const [vesselId, at] of runs)
			this.#lastRun.set(vesselId, Math.floor(at / MS_PER_MIN) * MS_PER_MIN);
	}

	/** Rebuilds every job from the database (start-up). */
	rebuildAll(): Promise<void> {
		return this.#enqueue(async () => {
			const specs = await this.hooks.loadAll();
			const wanted = new Set(specs.map((s) => s.vesselId));
			for (const vesselId of [...this.#jobs.keys()])
				if (!wanted.has(vesselId)) await this.#drop(vesselId);
			for (const spec of specs) await this.#build(spec);
		});
	}

	/** Rebuilds one vessel's job from what is stored now (after a schedule or time-zone change). */
	rebuild(vesselId: number): Promise<void> {
		return this.#enqueue(async () => {
			const spec = await this.hooks.load(vesselId);
			if (spec) await this.#build(spec);
			else await this.#drop(vesselId);
		});
	}

	/** The live jobs, one per vessel with an enabled schedule. */
	jobs(): JobInfo[] {
		return [...this.#jobs.values()].map(({ task: _task, ...info }) => info);
	}

	job(vesselId: number): JobInfo | undefined {
		const job = this.#jobs.get(vesselId);
		if (!job) return undefined;
		const { task: _task, ...info } = job;
		return info;
	}

	/** Runs a vessel's node-cron task now, as its minute tick would (tests, with `clock`). */
	async runNow(vesselId: number): Promise<void> {
		await this.#jobs.get(vesselId)?.task.execute();
	}

	/** Waits until queued rebuilds have finished. */
	idle(): Promise<void> {
		return this.#queue.then(() => undefined);
	}

	async stop(): Promise<void> {
		this.#stopped = true;
		await this.#enqueue(async () => {
			for (const vesselId of [...this.#jobs.keys()]) await this.#drop(vesselId);
		});
	}

	#enqueue(work: () => Promise<void>): Promise<void> {
		const next = this.#queue.then(work, work);
		this.#queue = next.catch((err) => this.hooks.log?.(`scheduler: ${String(err)}`));
		return next;
	}

	async #drop(vesselId: number) {
		const job = this.#jobs.get(vesselId);
		if (!job) return;
		this.#jobs.delete(vesselId);
		// destroy() stops the task and removes it from node-cron's registry
		await job.task.destroy();
	}

	async #build(spec: JobSpec) {
		await this.#drop(spec.vesselId);
		if (this.#stopped || !spec.schedule.enabled) return;
		const name = `purge:${spec.vesselCode}`;
		let job: Job | undefined;
		const tick = (c: TaskContext) => {
			if (!job || this.#jobs.get(spec.vesselId) !== job) return; // replaced: never fire
			const at = this.clock ? this.clock() : c.date.getTime();
			return this.#check(job, at);
		};
		let task: ScheduledTask;
		try {
			task = cron.createTask('* * * * *', tick, {
				name,
				timezone: spec.timeZone,
				noOverlap: true,
				unref: true,
				missedExecutionTolerance: LATE_TICK_TOLERANCE_MS
			});
		} catch (err) {
			this.hooks.log?.(`no purge job for ${spec.vesselCode}: ${String(err)}`);
			return;
		}
		task.on('execution:missed', (c) => {
			if (!job || this.#jobs.get(spec.vesselId) !== job) return;
			const at = c.date.getTime();
			if (Date.now() - at <= MAX_CATCH_UP_MS) void this.#check(job, at);
		});
		job = { ...spec, name, taskId: task.id, builtAt: Date.now(), task };
		this.#jobs.set(spec.vesselId, job);
		await task.start();
	}

	async #check(job: Job, at: number) {
		let due: boolean;
		try {
			due = isDue(job.schedule, job.timeZone, at);
		} catch (err) {
			this.hooks.log?.(`purge schedule of ${job.vesselCode}: ${String(err)}`);
			return;
		}
		if (!due) return;
		const minute = Math.floor(at / MS_PER_MIN) * MS_PER_MIN;
		if (this.#lastRun.get(job.vesselId) === minute) return;
		this.#lastRun.set(job.vesselId, minute);
		try {
			await this.hooks.due(job, minute);
		} catch (err) {
			this.hooks.log?.(`scheduled purge of ${job.vesselCode}: ${String(err)}`);
		}
	}
}
