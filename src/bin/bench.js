#!/usr/bin/env node
// `npm run bench`: builds when the sources changed, then runs tests/bench/run.ts with tsx, which
// starts the built app with its own throwaway PostgreSQL and prints each benchmark's figures.
// Plain JavaScript with no dependencies, because it runs before anything is compiled.
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildIsStale } from './freshness.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
process.chdir(root);

if (buildIsStale()) {
	console.log('[bench] Building (the sources are newer than the build)…');
	const res = spawnSync('npm', ['run', 'build', '--silent'], { stdio: 'inherit' });
	if (res.status !== 0) {
		console.error("[bench] 'npm run build' failed.");
		process.exit(res.status ?? 1);
	}
}

const tsx = path.join(root, 'node_modules/.bin/tsx');
if (!fs.existsSync(tsx)) {
	console.error('[bench] node_modules/.bin/tsx is missing: install the dev dependencies (npm ci).');
	process.exit(1);
}
// Arguments pick benchmarks by name: `npm run bench -- pins`.
const child = spawn(tsx, ['tests/bench/run.ts', ...process.argv.slice(2)], {
	stdio: 'inherit',
	env: { ...process.env, NODE_NO_WARNINGS: '1' }
});
for (const signal of /** @type {const} */ (['SIGINT', 'SIGTERM'])) process.on(signal, () => child.kill(signal));
child.on('exit', (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
