/**
 * Starts the built app (build/index.js) as a real server on a free loopback port, with its own
 * throwaway PostgreSQL and its built-in mail catcher, seeded with the demo. Tests read the
 * address from STIPPLE_E2E_URL.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort, startLocalCluster } from '../../src/lib/server/db/local-cluster';

const root = path.resolve(import.meta.dirname, '../..');

export default async function globalSetup() {
	if (!fs.existsSync(path.join(root, 'build/index.js')))
		throw new Error('Run `npm run build` before the end-to-end tests.');
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stipple-e2e-'));
	fs.chmodSync(dir, 0o755);
	const cluster = await startLocalCluster({ dataDir: path.join(dir, 'pg'), ephemeral: true, log: () => {} });
	const port = await freePort();
	const url = `http://127.0.0.1:${port}`;
	const logFile = path.join(dir, 'app.log');
	const out = fs.openSync(logFile, 'a');
	const app = spawn(process.execPath, ['build/index.js'], {
		cwd: root,
		stdio: ['ignore', out, out],
		env: {
			...process.env,
			NODE_ENV: 'production',
			NODE_NO_WARNINGS: '1',
			BODY_SIZE_LIMIT: '64M',
			HOST: '127.0.0.1',
			PORT: String(port),
			ORIGIN: url,
			DATABASE_URL: cluster.url,
			SMTP_URL: '',
			S3_ENDPOINT: '',
			STIPPLE_DATA_DIR: dir,
			BETTER_AUTH_SECRET: 'end-to-end-tests-only-secret-0123456789'
		}
	});
	const deadline = Date.now() + 60_000;
	for (;;) {
		if (app.exitCode !== null) throw new Error(`The app exited early:\n${fs.readFileSync(logFile, 'utf8')}`);
		try {
			if ((await fetch(`${url}/api/v1/health`)).ok) break;
		} catch {
			// not listening yet
		}
		if (Date.now() > deadline)
			throw new Error(`The app did not answer within 60 s:\n${fs.readFileSync(logFile, 'utf8')}`);
		await new Promise((r) => setTimeout(r, 200));
	}
	process.env.STIPPLE_E2E_URL = url;
	process.env.STIPPLE_E2E_LOG = logFile;

	return async () => {
		await new Promise<void>((resolve) => {
			if (app.exitCode !== null) return resolve();
			app.once('exit', () => resolve());
			app.kill('SIGTERM');
			setTimeout(() => app.kill('SIGKILL'), 10_000).unref();
		});
		await cluster.stop();
		fs.rmSync(dir, { recursive: true, force: true });
	};
}
