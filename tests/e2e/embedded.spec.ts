import { expect, test } from '@playwright/test';
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort } from '../../src/lib/server/db/local-cluster';

const root = path.resolve(import.meta.dirname, '../..');

// The single-machine default: no DATABASE_URL, SMTP_URL or S3_ENDPOINT. The built app must start
// its own PostgreSQL, mail catcher and S3 stand-in, seed the demo, serve it, and stop them all on SIGTERM.
test('with nothing configured, the built app runs its own services and stops them cleanly', async ({ browser }) => {
	test.setTimeout(120_000);
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stipple-embedded-'));
	fs.chmodSync(dir, 0o755);
	const port = await freePort();
	const url = `http://127.0.0.1:${port}`;
	let output = '';
	const app = spawn(process.execPath, ['build/index.js'], {
		cwd: root,
		env: {
			PATH: process.env.PATH,
			NODE_ENV: 'production',
			NODE_NO_WARNINGS: '1',
			HOST: '127.0.0.1',
			PORT: String(port),
			ORIGIN: url,
			STIPPLE_DATA_DIR: dir
		}
	});
	app.stdout.on('data', (d) => (output += d));
	app.stderr.on('data', (d) => (output += d));
	try {
		await expect
			.poll(async () => (await fetch(`${url}/api/v1/health`).catch(() => null))?.status ?? 0, { timeout: 90_000 })
			.toBe(200);
		expect(output).toContain('PostgreSQL (embedded) on 127.0.0.1:');
		expect(output).toContain('Demo sign-ins');
		expect(output).toContain('admin@example.com');
		expect(fs.existsSync(path.join(dir, 'pg', 'pgdata', 'PG_VERSION'))).toBe(true);

		const page = await browser.newPage();
		await page.goto(`${url}/sign-in`);
		await page.getByLabel('E-mail').fill('admin@example.com');
		await page.getByLabel('Password').fill('pin-the-defects');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect(page.getByRole('heading', { name: 'Good to see you, Orla' })).toBeVisible();
		await page.close();
	} finally {
		const exited = new Promise<number | null>((resolve) => app.once('exit', (code) => resolve(code)));
		app.kill('SIGTERM');
		const code = await Promise.race([exited, new Promise<'hung'>((r) => setTimeout(() => r('hung'), 20_000))]);
		if (code === 'hung') app.kill('SIGKILL');
		expect(code, output).toBe(0);
		// PostgreSQL shut down with the app: its pid file is gone.
		expect(fs.existsSync(path.join(dir, 'pg', 'pgdata', 'postmaster.pid'))).toBe(false);
		fs.rmSync(dir, { recursive: true, force: true });
	}
});
