/**
 * Background jobs through a database outage. pg-boss 10.4.2 recorded a job's outcome without
 * waiting for it, so a database that went away while a job ran ended the whole app process with
 * an unhandled rejection (found by the fault run in load.test.ts; upstream timgit/pg-boss#577).
 * `patches/pg-boss+10.4.2.patch` waits for it and reports the failure as an `error` event; the job
 * then expires and is retried. This test fails without the patch.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import PgBoss from 'pg-boss';
import { afterAll, expect, test } from 'vitest';
import { startLocalCluster, type LocalCluster } from '../../src/lib/server/db/local-cluster';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stipple-jobs-outage-'));
fs.chmodSync(dir, 0o755);
let cluster: LocalCluster | null = null;
let boss: PgBoss | null = null;

afterAll(async () => {
	await boss?.stop({ graceful: false, wait: true }).catch(() => {});
	await cluster?.stop();
	fs.rmSync(dir, { recursive: true, force: true });
}, 60_000);

test('a job whose database crashes while it runs: an error event, the process lives on, jobs run again after', async () => {
	const dataDir = path.join(dir, 'pg');
	// Durable (fsync on), as a plant's database: the crash loses nothing committed.
	cluster = await startLocalCluster({ dataDir, log: () => {} });
	const { port } = cluster;
	const unhandled: unknown[] = [];
	const onUnhandled = (reason: unknown) => unhandled.push(reason);
	process.on('unhandledRejection', onUnhandled);
	try {
		boss = new PgBoss({ connectionString: cluster.url, max: 2 });
		const errors: string[] = [];
		boss.on('error', (e) => errors.push(e.message));
		await boss.start();
		await boss.createQueue('outage', { name: 'outage' });

		const done: string[] = [];
		await boss.work<{ step: string }>('outage', { pollingIntervalSeconds: 0.5 }, async ([job]) => {
			// The first run crashes the database under itself, so recording its outcome fails.
			// (Once: a retry of the job after the restart just runs.)
			if (!done.length) await cluster!.stop('immediate');
			done.push(job!.data.step);
		});
		await boss.send('outage', { step: 'first' });
		const until = async (what: () => boolean, ms: number) => {
			for (let waited = 0; !what() && waited < ms; waited += 100) await new Promise((r) => setTimeout(r, 100));
		};
		await until(() => done.includes('first'), 20_000);
		expect(done[0]).toBe('first');
		// Recording 'first' met a database that was gone: reported, not thrown.
		await until(() => errors.length > 0, 10_000);
		expect(errors.length).toBeGreaterThan(0);

		cluster = await startLocalCluster({ dataDir, port, log: () => {} });
		// The same workers pick up new work once the database is back (the pool's first tries may
		// still meet connections of the crashed server).
		for (let tries = 1; ; tries++) {
			try {
				await boss.send('outage', { step: 'after' });
				break;
			} catch (e) {
				if (tries === 20) throw e;
				await new Promise((r) => setTimeout(r, 250));
			}
		}
		await until(() => done.includes('after'), 60_000);
		expect({ done, errors }).toMatchObject({ done: expect.arrayContaining(['after']) });
		// Give a stray rejection a moment to surface before looking.
		await new Promise((r) => setTimeout(r, 500));
		expect(unhandled).toEqual([]);
	} finally {
		process.off('unhandledRejection', onUnhandled);
	}
}, 150_000);
