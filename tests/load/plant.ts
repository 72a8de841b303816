/**
 * A plant under load: one PostgreSQL cluster with durable settings (fsync on, so a crash of the
 * database loses nothing it acknowledged), one or more app processes on fixed loopback ports
 * that can be killed and started again, and as many extra inspector accounts in the demo
 * organisation as a run needs, each signed in through the sign-in form.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import postgres from 'postgres';
import { AppProcess } from '../fixtures/app-server';
import { freePort, startLocalCluster, type LocalCluster } from '../../src/lib/server/db/local-cluster';
import { signInCookie } from '../fixtures/sign-in';

export interface InspectorAccount {
	email: string;
	/** The Cookie header of its signed-in session. */
	cookie: string;
}

/** What the simulated inspectors pin on: the demo part FW-118, its front drawing, minor types. */
export interface Workpiece {
	orgId: string;
	partId: string;
	revisionId: string;
	/** Severity C and D types: the demo plan wants photos only for A and B. */
	defectTypeIds: string[];
}

export interface Plant {
	apps: AppProcess[];
	sql: postgres.Sql;
	workpiece: Workpiece;
	/**
	 * `count` new inspectors in the demo organisation, e-mails `${group}-1@example.com`…, each
	 * signed in: every run gets its own, so no run resumes another's open samples.
	 */
	addInspectors(group: string, count: number): Promise<InspectorAccount[]>;
	/** Crashes PostgreSQL (immediate shutdown) and starts it again on the same port. */
	restartDatabase(): Promise<void>;
	stop(): Promise<void>;
}

/**
 * Adds `count` inspectors to the demo organisation straight in the database (the demo password's
 * hash is copied from the demo inspector), then signs each in through the app.
 */
async function addInspectors(sql: postgres.Sql, base: string, orgId: string, group: string, count: number) {
	const [demo] = await sql<{ password: string }[]>`
		SELECT a.password FROM account a JOIN "user" u ON u.id = a.user_id
		WHERE u.email = 'inspector@example.com' AND a.provider_id = 'credential'`;
	if (!demo) throw new Error('The demo inspector is missing (was the demo seeded?).');
	const emails: string[] = [];
	await sql.begin(async (tx) => {
		for (let i = 1; i <= count; i++) {
			const id = randomUUID();
			const email = `${group}-${i}@example.com`;
			emails.push(email);
			await tx`INSERT INTO "user" (id, name, email, email_verified) VALUES (${id}, ${`${group} ${i}`}, ${email}, true)`;
			await tx`INSERT INTO account (id, account_id, provider_id, user_id, password)
				VALUES (${randomUUID()}, ${id}, 'credential', ${id}, ${demo.password})`;
			await tx`INSERT INTO member (id, organization_id, user_id, role) VALUES (${randomUUID()}, ${orgId}, ${id}, 'inspector')`;
		}
	});
	// A few at a time: each sign-in checks a password hash, which is meant to be slow.
	const accounts: InspectorAccount[] = [];
	for (let i = 0; i < emails.length; i += 8) {
		const batch = emails.slice(i, i + 8);
		const cookies = await Promise.all(batch.map((email) => signInCookie(base, email)));
		batch.forEach((email, j) => accounts.push({ email, cookie: cookies[j]! }));
	}
	return accounts;
}

async function findWorkpiece(sql: postgres.Sql): Promise<Workpiece> {
	const [row] = await sql<{ orgId: string; partId: string; revisionId: string }[]>`
		SELECT p.organization_id AS "orgId", p.id AS "partId", r.id AS "revisionId"
		FROM part p JOIN part_view v ON v.part_id = p.id JOIN view_revision r ON r.view_id = v.id
		WHERE p.number = 'FW-118' ORDER BY v.position, r.revision DESC LIMIT 1`;
	if (!row) throw new Error('The demo part FW-118 has no drawing.');
	const types = await sql<{ id: string }[]>`
		SELECT id FROM defect_type
		WHERE organization_id = ${row.orgId} AND severity IN ('C', 'D') AND retired_at IS NULL ORDER BY code`;
	if (!types.length) throw new Error('The demo catalogue has no minor defect types.');
	return { ...row, defectTypeIds: types.map((t) => t.id) };
}

export async function startPlant(label: string, options: { apps?: number } = {}): Promise<Plant> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), `stipple-${label}-`));
	fs.chmodSync(dir, 0o755);
	const dataDir = path.join(dir, 'pg');
	let cluster: LocalCluster = await startLocalCluster({ dataDir, log: () => {} });
	const apps: AppProcess[] = [];
	const sql = postgres(cluster.url, { max: 4, onnotice: () => {}, connection: { application_name: 'stipple-load' } });
	const stop = async () => {
		await Promise.all(apps.map((a) => a.kill()));
		await sql.end({ timeout: 5 });
		await cluster.stop();
		// STIPPLE_LOAD_KEEP=1 keeps the app logs and the database for a look afterwards.
		if (process.env.STIPPLE_LOAD_KEEP) console.log(`[load] kept ${dir}`);
		else fs.rmSync(dir, { recursive: true, force: true });
	};
	try {
		for (let i = 0; i < (options.apps ?? 1); i++) {
			const app = new AppProcess({
				label,
				port: await freePort(),
				databaseUrl: cluster.url,
				dataDir: path.join(dir, `app-${i}`),
				logFile: path.join(dir, `app-${i}.log`)
			});
			fs.mkdirSync(path.join(dir, `app-${i}`));
			apps.push(app);
			// One after the other: the first migrates and seeds, the others find it done.
			await app.start();
		}
		const workpiece = await findWorkpiece(sql);
		return {
			apps,
			sql,
			workpiece,
			addInspectors: (group, count) => addInspectors(sql, apps[0]!.url, workpiece.orgId, group, count),
			async restartDatabase() {
				const { port } = cluster;
				await cluster.stop('immediate');
				cluster = await startLocalCluster({ dataDir, port, log: () => {} });
			},
			stop
		};
	} catch (e) {
		await stop();
		throw e;
	}
}
