#!/usr/bin/env node
// `npm run bench`: builds when the sources changed, then runs tests/bench/run.ts with tsx, which
// starts the built app with its own throwaway PostgreSQL and prints each benchmark's figures.
// Plain JavaScript with no dependencies, because it runs before anything is compiled.
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
process.chdir(root);

/** @param {string} p */
function mtime(p) {
	try {
		return fs.statSync(p).mtimeMs;
	} catch {
		return 0;
	}
}

/** @param {string} p @returns {number} */
function newest(p) {
	if (!fs.existsSync(p)) return 0;
	const st = fs.statSync(p);
	if (!st.isDirectory()) return st.mtimeMs;
	let max = st.mtimeMs;
	for (const entry of fs.readdirSync(p)) max = Math.max(max, newest(path.join(p, entry)));
	return max;
}

if (mtime('build/index.js') < newest('src')) {
	console.log('[bench] Building (the sources are newer than build/index.js)…');
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
