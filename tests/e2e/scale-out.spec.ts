/**
 * Scale-out: a second app process on another port against the suite's database (and its S3
 * stand-in and mail catcher, as two instances behind a load balancer would share them). A sample
 * closed through the first process shows up, without a reload, on a Trends page served by the
 * second: the event travels through PostgreSQL's NOTIFY, not through either process's memory.
 */
import fs from 'node:fs';
import { expect, test } from '@playwright/test';
import { anotherApp } from './another-app';
import { closedSample, demo } from './demo-api';
import { DEMO_PASSWORD, shoot, signIn } from './helpers';

/** The first process's S3 stand-in and mail catcher, from the lines it logs when it starts them. */
function sharedServices(): Record<string, string> {
	const log = fs.readFileSync(process.env.STIPPLE_E2E_LOG!, 'utf8');
	const s3 = /S3 stand-in \(s3rver\) on (\S+),/.exec(log)?.[1];
	const smtp = /Mail catcher on (\S+);/.exec(log)?.[1];
	if (!s3 || !smtp) throw new Error('The first app did not log its S3 stand-in and mail catcher.');
	return { S3_ENDPOINT: s3, SMTP_URL: smtp };
}

test('two app processes, one database: a sample closed on one arrives live on Trends served by the other', async ({
	browser,
	playwright
}) => {
	test.setTimeout(90_000);
	const second = await anotherApp(sharedServices());
	const first = await playwright.request.newContext({ baseURL: process.env.STIPPLE_E2E_URL });
	try {
		expect(second.url).not.toBe(process.env.STIPPLE_E2E_URL);
		const context = await browser.newContext({ baseURL: second.url, viewport: { width: 1280, height: 900 } });
		const trends = await context.newPage();
		await signIn(trends, 'engineer@example.com');
		const d = await demo(trends.request);
		await trends.goto(`/trends?part=${d.partId}`);
		const chart = trends.getByTestId('control-chart');
		await expect(chart).toBeVisible();
		await expect(trends.getByTestId('live-state')).toHaveAttribute('data-live', 'yes');
		const before = Number(await chart.getAttribute('data-points'));

		// The inspector works on the first process.
		const signedIn = await first.post('/sign-in', {
			form: { email: 'inspector@example.com', password: DEMO_PASSWORD },
			headers: { origin: process.env.STIPPLE_E2E_URL!, accept: 'text/html' },
			maxRedirects: 0
		});
		expect(signedIn.status()).toBe(303);
		await closedSample(first, d, [['SK'], [], ['FL'], [], []]);

		await expect(chart).toHaveAttribute('data-points', String(before + 1));
		await shoot(trends, 'scale-out-trends-on-second-process');
		await context.close();
	} finally {
		await first.dispose();
		await second.stop();
	}
});
