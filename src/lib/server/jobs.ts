/**
 * Background jobs on a PostgreSQL-backed queue (pg-boss): looking for signals after a sample
 * closes, and the e-mail about new ones. Jobs survive a crash and are retried with back-off; any
 * app process may run them.
 */
import PgBoss from 'pg-boss';

export const QUEUES = { evaluate: 'evaluate-signals', mail: 'signal-mail' } as const;

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
		boss = b;
		return b;
	})();
	return starting;
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
