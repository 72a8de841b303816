/**
 * Starts what Stipple needs on this machine when nothing is configured: its own PostgreSQL
 * (no DATABASE_URL), a mail catcher (no SMTP_URL) and an S3 stand-in (no S3_ENDPOINT). Then migrates and seeds the demo once.
 * With the variables set, the same code talks to the managed services instead.
 */
import path from 'node:path';
import { closeDb, migrateDb } from './db';
import { startLocalCluster, type LocalCluster } from './db/local-cluster';
import { dataRoot, authSecret, DEMO_PASSWORD } from './config';
import { startMailCatcher, type MailCatcher } from './mail-catcher';
import { startJobs, stopJobs } from './jobs';
import { closeMail } from './mail';
import { seedDemoOnce, DEMO_USERS } from './seed';
import { closeStorage, ensureBucket, startLocalS3, type LocalS3 } from './storage';

let cluster: LocalCluster | undefined;
let catcher: MailCatcher | undefined;
let localS3: LocalS3 | undefined;
let started: Promise<void> | undefined;

const log = (line: string) => console.log(`[stipple] ${line}`);

export function startServices(): Promise<void> {
	started ??= start();
	return started;
}

async function start() {
	if (!process.env.DATABASE_URL) {
		cluster = await startLocalCluster({ dataDir: path.join(dataRoot(), 'pg'), log });
		process.env.DATABASE_URL = cluster.url;
		log(`PostgreSQL (embedded) on 127.0.0.1:${cluster.port}, data in ${cluster.dataDir}`);
	}
	authSecret();
	await migrateDb();
	if (!process.env.SMTP_URL) {
		catcher = await startMailCatcher();
		process.env.SMTP_URL = catcher.url;
		process.env.STIPPLE_MAIL_CATCHER = '1';
		log(`Mail catcher on ${catcher.url}; admins read caught mail at /mailbox`);
	}
	if (!process.env.S3_ENDPOINT) {
		localS3 = await startLocalS3(path.join(dataRoot(), 's3'));
		process.env.S3_ENDPOINT = localS3.endpoint;
		log(`S3 stand-in (s3rver) on ${localS3.endpoint}, files in ${path.join(dataRoot(), 's3')}`);
	}
	await ensureBucket();
	if (process.env.STIPPLE_SEED !== 'off') {
		const seeded = await seedDemoOnce();
		if (seeded) log('Demo organisation seeded (first run).');
		log(`Demo sign-ins (password "${DEMO_PASSWORD}"):`);
		for (const u of DEMO_USERS) log(`  ${u.role.padEnd(9)} ${u.email}`);
	}
	await startJobs();
	process.once('sveltekit:shutdown', () => void stopServices());
}

export async function stopServices() {
	await stopJobs();
	closeMail();
	closeStorage();
	await catcher?.stop();
	await localS3?.stop();
	await closeDb();
	await cluster?.stop();
	catcher = undefined;
	localS3 = undefined;
	cluster = undefined;
	started = undefined;
}
