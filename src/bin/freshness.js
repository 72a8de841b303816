// Whether the built app is older than what it is built from. Shared by the plain-JavaScript
// launchers (`npm start`, `npm run bench`), which run before anything is compiled.
import fs from 'node:fs';
import path from 'node:path';

/** @param {string} p @returns {number} modification time in ms, 0 when missing */
export function mtime(p) {
	try {
		return fs.statSync(p).mtimeMs;
	} catch {
		return 0;
	}
}

/** @param {string} p @returns {number} the newest modification time in a file tree */
function newest(p) {
	if (!fs.existsSync(p)) return 0;
	const st = fs.statSync(p);
	if (!st.isDirectory()) return st.mtimeMs;
	let max = st.mtimeMs;
	for (const entry of fs.readdirSync(p)) max = Math.max(max, newest(path.join(p, entry)));
	return max;
}

const INPUTS = ['src', 'static', 'package-lock.json', 'svelte.config.js', 'vite.config.ts', 'tailwind.config.ts'];

/** True when build/ is missing or any build input changed after it. Run from the project root. */
export function buildIsStale() {
	return mtime('build/handler.js') < Math.max(...INPUTS.map(newest));
}
