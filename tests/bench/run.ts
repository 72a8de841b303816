/**
 * `npm run bench`: starts the built app (build/index.js) on a free loopback port with its own
 * throwaway PostgreSQL, as the end-to-end setup does (tests/e2e/global-setup.ts), seeded with
 * the demo; runs every tests/bench/*.bench.ts in turn and prints each one's table; stops
 * everything again, also on an error or Ctrl+C. Figures only: it never fails on speed.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { freePort, startLocalCluster } from '../../src/lib/server/db/local-cluster';
import { formatTable, isBench, type BenchContext } from './helpers';

const root = path.resolve(import.meta.dirname, '../..');
const benchDir = import.meta.dirname;

/** Undone in reverse order by stopAll(), whatever happened before. */
const cleanups: { what: string; undo: () => Promise<void> | void }[] = [];
let stopping: Promise<void> | undefined;

function stopAll(): Promise<void> {
	stopping ??= (async () => {
		for (const { what, undo } of cleanups.reverse()) {
			try {
				await undo();
			} catch (e) {
				console.error(`[bench] stopping ${what} failed: ${e instanceof Error ? e.message : String(e)}`);
			}
		}
	})();
	return stopping;
}

for (const signal of ['SIGINT', 'SIGTERM'] as const) {
	process.on(signal, () => {
		console.error(`[bench] ${signal}: stopping…`);
		void stopAll().finally(() => process.exit(signal === 'SIGINT' ? 130 : 143));
	});
}

function tail(file: string, lines = 40) {
	try {
		return fs.readFileSync(file, 'utf8').trimEnd().split('\n').slice(-lines).join('\n');
	} catch {
		return '(no log)';
	}
}

const loadAverage = () =>
	os
		.loadavg()
		.map((l) => l.toFixed(2))
		.join(' ');

function postmasterPid(dataDir: string): number | null {
	try {
		const pid = Number(fs.readFileSync(path.join(dataDir, 'pgdata', 'postmaster.pid'), 'utf8').split('\n')[0]);
		return Number.isInteger(pid) && pid > 0 ? pid : null;
	} catch {
		return null;
	}
}

async function startServices(): Promise<BenchContext> {
	if (!fs.existsSync(path.join(root, 'build/index.js')))
		throw new Error('build/index.js is missing: run `npm run build` (npm run bench does it for you).');
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stipple-bench-'));
	fs.chmodSync(dir, 0o755);
	cleanups.push({ what: 'the temporary folder', undo: () => fs.rmSync(dir, { recursive: true, force: true }) });

	const cluster = await startLocalCluster({ dataDir: path.join(dir, 'pg'), ephemeral: true, log: () => {} });
	cleanups.push({ what: 'PostgreSQL', undo: () => cluster.stop() });

	const port = await freePort();
	const url = `http://127.0.0.1:${port}`;
	const appLog = path.join(dir, 'app.log');
	const out = fs.openSync(appLog, 'a');
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
			BETTER_AUTH_SECRET: 'benchmark-runs-only-secret-0123456789abcdef'
		}
	});
	fs.closeSync(out);
	cleanups.push({
		what: 'the app',
		undo: () =>
			new Promise<void>((resolve) => {
				if (app.exitCode !== null || app.signalCode !== null) return resolve();
				app.once('exit', () => resolve());
				app.kill('SIGTERM');
				setTimeout(() => app.kill('SIGKILL'), 10_000).unref();
			})
	});

	const deadline = Date.now() + 60_000;
	for (;;) {
		if (app.exitCode !== null) throw new Error(`The app exited early:\n${tail(appLog)}`);
		try {
			if ((await fetch(`${url}/api/v1/health`, { signal: AbortSignal.timeout(5_000) })).ok) break;
		} catch {
			// not listening yet
		}
		if (Date.now() > deadline) throw new Error(`The app did not answer within 60 s:\n${tail(appLog)}`);
		await new Promise((r) => setTimeout(r, 200));
	}
	return { url, databaseUrl: cluster.url, appPid: app.pid!, postgresPid: postmasterPid(cluster.dataDir), appLog };
}

function benchFiles(): string[] {
	const only = process.argv.slice(2);
	return fs
		.readdirSync(benchDir)
		.filter((f) => f.endsWith('.bench.ts'))
		.filter((f) => !only.length || only.some((o) => f.includes(o)))
		.sort()
		.map((f) => path.join(benchDir, f));
}

async function main(): Promise<number> {
	const files = benchFiles();
	if (!files.length) {
		console.error('[bench] no tests/bench/*.bench.ts matched.');
		return 1;
	}
	const started = performance.now();
	const ctx = await startServices();
	console.log(
		`Stipple benchmarks · node ${process.version} · ${os.availableParallelism()} CPUs (${os.cpus()[0]?.model.trim() ?? 'unknown'})`
	);
	console.log(
		`app ${ctx.url} (build/index.js, NODE_ENV=production) · throwaway PostgreSQL (fsync=off, synchronous_commit=off) · app, database and clients share this machine`
	);
	console.log(
		`services ready in ${((performance.now() - started) / 1000).toFixed(1)} s · load average ${loadAverage()} (other work on this machine skews the figures)`
	);

	let failed = 0;
	for (const file of files) {
		const name = path.basename(file, '.bench.ts');
		const t0 = performance.now();
		try {
			const mod = (await import(pathToFileURL(file).href)) as { default?: unknown };
			if (!isBench(mod.default)) throw new Error(`${path.basename(file)} has no default export from defineBench().`);
			console.log(`\n== ${name}: ${mod.default.title}`);
			const report = await mod.default.run(ctx);
			console.log(formatTable(report.columns, report.rows));
			for (const line of report.lines) console.log(line);
			console.log(`(${name} took ${((performance.now() - t0) / 1000).toFixed(1)} s)`);
		} catch (e) {
			failed++;
			console.error(`\n[bench] ${name} could not run: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
			console.error(`[bench] last lines of the app's log:\n${tail(ctx.appLog)}`);
		}
	}
	console.log(
		`\nall benchmarks took ${((performance.now() - started) / 1000).toFixed(1)} s · load average ${loadAverage()}`
	);
	return failed ? 1 : 0;
}

let code = 1;
try {
	code = await main();
} catch (e) {
	console.error(`[bench] ${e instanceof Error ? e.message : String(e)}`);
} finally {
	await stopAll();
}
process.exit(code);
