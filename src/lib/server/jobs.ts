/**
 * Background jobs on a PostgreSQL-backed queue (pg-boss): looking for signals after a sample
 * closes, the e-mail about new ones, and the weekly digest. Jobs survive a crash and are retried
 * with back-off; any app process may run them.
 */
import PgBoss from 'pg-boss';

export const QUEUES = { evaluate: 'evaluate-signals', mail: 'signal-mail', digest: 'weekly-digest' } as const;

/** Monday 06:00 UTC. STIPPLE_DIGEST_CRON (five-field cron, UTC) moves it; `off` sends no digests. */
export const DIGEST_CRON = '0 6 * * 1';

export interface EvaluateJob {
	orgId: string;
	partId: string;
}

export interface SignalMailJob {
	orgId: string;
	partId: string;
	signalIds: string[];
}

let starting: Promise<PgBoss> | undefined;
let boss: PgBoss | undefined;

/** Starts the queue and this process's workers (once). */
export function startJobs(): Promise<PgBoss> {
	starting ??= (async () => {
		const b = new PgBoss({
			connectionString: process.env.DATABASE_URL,
			schema: 'pgboss',
			max: 3,
			application_name: 'stipple-jobs'
		});
		b.on('error', (e) => console.error(`[stipple] jobs: ${e.message}`));
		await b.start();
		const retry = { retryLimit: 6, retryDelay: 2, retryBackoff: true, expireInSeconds: 120 };
		await b.createQueue(QUEUES.evaluate, { name: QUEUES.evaluate, ...retry });
		await b.createQueue(QUEUES.mail, { name: QUEUES.mail, ...retry });
		// Imported here, not at the top: signals.ts enqueues jobs itself.
		const { evaluateSignals, mailSignals } = await import('./signals');
		await b.work<EvaluateJob>(QUEUES.evaluate, { pollingIntervalSeconds: 0.5 }, async (jobs) => {
			for (const job of jobs) await evaluateSignals(job.data.orgId, job.data.partId);
		});
		await b.work<SignalMailJob>(QUEUES.mail, { pollingIntervalSeconds: 1 }, async (jobs) => {
			for (const job of jobs) await mailSignals(job.data);
		});
		await startDigest(b);
		boss = b;
		return b;
	})();
	return starting;
}

/**
 * The weekly digest: pg-boss's schedule puts one job per cron tick in the queue (its own singleton
 * per minute keeps several app processes from doubling it). The worker sends the digest of the last
 * whole Monday-to-Sunday week; sendDigests itself records each (person, part, week) it sent, so a
 * retry or a second run that week sends only what is missing.
 */
async function startDigest(b: PgBoss) {
	await b.createQueue(QUEUES.digest, {
		name: QUEUES.digest,
		retryLimit: 4,
		retryDelay: 300,
		retryBackoff: true,
		expireInSeconds: 3600
	});
	const cron = (process.env.STIPPLE_DIGEST_CRON ?? DIGEST_CRON).trim();
	try {
		if (cron === 'off') await b.unschedule(QUEUES.digest);
		else await b.schedule(QUEUES.digest, cron, {}, { tz: 'UTC' });
	} catch (e) {
		// A mistyped STIPPLE_DIGEST_CRON must not stop the other queues.
		console.error(`[stipple] jobs: weekly digest not scheduled (${e instanceof Error ? e.message : String(e)})`);
	}
	const { sendDigests, weekEndingOf } = await import('./digest');
	await b.work(QUEUES.digest, { pollingIntervalSeconds: 30 }, async () => {
		await sendDigests(weekEndingOf(new Date()));
	});
}

export async function enqueue(queue: (typeof QUEUES)[keyof typeof QUEUES], data: object) {
	const b = await startJobs();
	await b.send(queue, data);
}

/** Signals are looked for in the background: closing a sample never waits for it. */
export const enqueueEvaluation = (orgId: string, partId: string) =>
	enqueue(QUEUES.evaluate, { orgId, partId } satisfies EvaluateJob);

export async function stopJobs() {
	const b = boss ?? (starting ? await starting.catch(() => undefined) : undefined);
	starting = undefined;
	boss = undefined;
	await b?.stop({ graceful: true, timeout: 5000, wait: true });
}
