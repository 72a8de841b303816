/**
 * One throwaway PostgreSQL for the integration run (never the dev data under .data/), migrated,
 * with the mail catcher writing into it and an S3 stand-in beside it. Workers get the addresses through `provide`.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { closeDb, migrateDb } from '../../src/lib/server/db';
import { startLocalCluster } from '../../src/lib/server/db/local-cluster';
import { startMailCatcher } from '../../src/lib/server/mail-catcher';
import { closeStorage, startLocalS3 } from '../../src/lib/server/storage';

declare module 'vitest' {
	export interface ProvidedContext {
		env: Record<string, string>;
	}
}

export default async function setup(project: TestProject) {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stipple-it-'));
	fs.chmodSync(dir, 0o755);
	const cluster = await startLocalCluster({ dataDir: path.join(dir, 'pg'), ephemeral: true, log: () => {} });
	process.env.DATABASE_URL = cluster.url;
	await migrateDb();
	const catcher = await startMailCatcher();
	const s3 = await startLocalS3(path.join(dir, 's3'));
	project.provide('env', {
		DATABASE_URL: cluster.url,
		SMTP_URL: catcher.url,
		S3_ENDPOINT: s3.endpoint,
		STIPPLE_DATA_DIR: dir,
		BETTER_AUTH_SECRET: 'integration-tests-only-secret-0123456789',
		ORIGIN: 'http://stipple.test'
	});
	return async () => {
		await catcher.stop();
		closeStorage();
		await s3.stop();
		await closeDb();
		await cluster.stop();
		fs.rmSync(dir, { recursive: true, force: true });
	};
}
