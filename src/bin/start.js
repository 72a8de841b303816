#!/usr/bin/env node
// `npm start`: installs what is missing, builds when the sources changed, then serves the built
// app. The app itself starts its embedded PostgreSQL and mail catcher when none is configured.
// Plain JavaScript with no dependencies, because it runs before `npm ci`.
import { spawn, spawnSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildIsStale, mtime } from './freshness.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
process.chdir(root);
const say = (/** @type {string} */ line) => console.log(`[stipple] ${line}`);

/** @param {string} cmd @param {string[]} args */
function run(cmd, args) {
	const res = spawnSync(cmd, args, { stdio: 'inherit' });
	if (res.status !== 0) {
		console.error(`[stipple] '${cmd} ${args.join(' ')}' failed.`);
		process.exit(res.status ?? 1);
	}
}

if (mtime('node_modules/.package-lock.json') < mtime('package-lock.json')) {
	say('Installing dependencies (npm ci)…');
	run('npm', ['ci', '--no-audit', '--no-fund']);
}

if (buildIsStale()) {
	say('Building…');
	run('npm', ['run', 'build', '--silent']);
}

const port = process.env.PORT ?? '3000';
const host = process.env.HOST ?? '127.0.0.1';
const env = {
	...process.env,
	NODE_ENV: 'production',
	PORT: port,
	HOST: host,
	ORIGIN: process.env.ORIGIN ?? `http://${host}:${port}`,
	NODE_NO_WARNINGS: '1',
	// Drawings can be large; the upload route checks its own, lower limit.
	BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT ?? '64M'
};
const app = spawn(process.execPath, ['build/index.js'], { stdio: 'inherit', env });
for (const signal of /** @type {const} */ (['SIGINT', 'SIGTERM'])) process.on(signal, () => app.kill(signal));

// Say where Stipple is once it answers.
const started = Date.now();
const poll = setInterval(async () => {
	try {
		const res = await fetch(`http://${host}:${port}/api/v1/health`);
		if (res.ok) {
			clearInterval(poll);
			say(`Stipple is ready at ${env.ORIGIN}  (Ctrl+C stops it)`);
		}
	} catch {
		if (Date.now() - started > 120_000) clearInterval(poll);
	}
}, 500);
app.on('exit', (code, signal) => {
	clearInterval(poll);
	process.exit(code ?? (signal ? 0 : 1));
});
