/** Another app process against the suite's database, for tests of several processes or other settings. */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { startAppIn } from '../fixtures/app-server';

/** Starts it with `env` on top (same auth secret as the suite's app); `stop` kills it and removes its files. */
export async function anotherApp(env: Record<string, string>) {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stipple-e2e-another-'));
	const { app, stop } = await startAppIn({
		label: 'e2e',
		dir,
		databaseUrl: process.env.STIPPLE_E2E_DATABASE_URL!,
		env
	});
	return { url: app.url, stop };
}
