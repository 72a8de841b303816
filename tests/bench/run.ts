/**
 * `npm run bench`: starts the built app (build/index.js) on a free loopback port with its own
 * throwaway PostgreSQL (tests/fixtures/app-server.ts, shared with the end-to-end setup), seeded with
 * the demo; runs every tests/bench/*.bench.ts in turn and prints each one's table; stops
 * everything again, also on an error or Ctrl+C. Figures only: it never fails on speed.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { startAppServer } from '../fixtures/app-server';
import { formatTable, isBench, type BenchContext } from './helpers';

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
	const server = await startAppServer('bench');
	cleanups.push({ what: 'the app, PostgreSQL and the temporary folder', undo: () => server.stop() });
	return {
		url: server.url,
		databaseUrl: server.databaseUrl,
		appPid: server.appPid,
		postgresPid: postmasterPid(server.clusterDataDir),
		appLog: server.appLog
	};
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
