/** Settings read from the environment, with the defaults of a single machine. */
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

/** Where embedded services keep their files. */
export function dataRoot() {
	return path.resolve(process.env.STIPPLE_DATA_DIR ?? '.data');
}

/**
 * The secret that signs sessions. Set BETTER_AUTH_SECRET in production; on a single machine
 * Stipple makes one once and keeps it under .data/ so sessions survive a restart.
 */
export function authSecret(): string {
	const fromEnv = process.env.BETTER_AUTH_SECRET;
	if (fromEnv) return fromEnv;
	const file = path.join(dataRoot(), 'auth-secret');
	if (!fs.existsSync(file)) {
		fs.mkdirSync(dataRoot(), { recursive: true });
		fs.writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 });
	}
	const secret = fs.readFileSync(file, 'utf8').trim();
	process.env.BETTER_AUTH_SECRET = secret;
	return secret;
}

/** The address people reach Stipple at, for links in e-mail. */
export function publicOrigin(): string {
	return (process.env.ORIGIN ?? `http://127.0.0.1:${process.env.PORT ?? 5173}`).replace(/\/$/, '');
}

export const DEMO_PASSWORD = 'pin-the-defects';
