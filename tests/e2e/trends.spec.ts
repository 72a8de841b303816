import { expect, test, type Page } from '@playwright/test';
import { closedSample, demo } from './demo-api';
import { shoot, signIn } from './helpers';

async function pointCount(page: Page) {
	return Number(await page.getByTestId('control-chart').getAttribute('data-points'));
}

test('an engineer reads Trends, a closed sample arrives live with its signal, and the signal is explained', async ({
	browser
}) => {
	test.setTimeout(120_000);
	const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
	const trends = await context.newPage();
	await signIn(trends, 'engineer@example.com');
	const request = trends.request;
	const d = await demo(request);

	// A calm baseline (1, 2, 1, 2 defects in 5 units: ū = 0.3, UCL ≈ 1.04), frozen as the limits.
	const baseline = [];
	for (const codes of [[['SK']], [['FL'], ['WL']], [[], ['SK']], [['FL', 'WL']]]) {
		baseline.push(await closedSample(request, d, codes));
	}
	const from = baseline[0]!.takenAt;
	const to = new Date(new Date(baseline.at(-1)!.takenAt).getTime() + 1).toISOString();
	const made = await request.post(`/api/v1/parts/${d.partId}/limit-sets`, {
		data: { method: 'u', baseline: { from, to }, note: 'e2e baseline' }
	});
	expect(made.status(), await made.text()).toBe(201);
	const { limitSet } = await made.json();
	expect(limitSet.rate).toBeCloseTo(0.3, 6);
	expect((await request.post(`/api/v1/limit-sets/${limitSet.id}/freeze`)).ok()).toBe(true);

	// Trends: the demo part, recent first, with its chart, Pareto and a frozen phase.
	await trends.goto('/trends');
	await trends.getByLabel('Part', { exact: true }).selectOption({ label: 'FW-118 · Vent grille cover' });
	await expect(trends).toHaveURL(new RegExp(`part=${d.partId}`));
	const chart = trends.getByTestId('control-chart');
	await expect(chart).toBeVisible();
	await expect(trends.getByTestId('phase-label').last()).toHaveText(/^Frozen/);
	await expect(trends.getByTestId('limit-sets').locator('li').first()).toContainText(/Frozen\s*ū 0\.30/);
	await expect(trends.getByTestId('pareto-table')).toContainText('Sink mark');
	await expect(trends.getByTestId('dispersion')).toContainText('dispersion test p');
	await expect(trends.getByText(/Statistical signals in Stipple support, and do not replace/)).toBeVisible();

	// Another defect type, then another method: both land in the address, so a link reproduces the chart.
	await trends.getByLabel('Defect type', { exact: true }).selectOption({ label: 'FL · Flash' });
	await expect(trends).toHaveURL(new RegExp(`type=${d.types.FL}`));
	await expect(trends.getByRole('heading', { name: /Defects per unit, FL/ })).toBeVisible();
	await trends.getByRole('link', { name: 'Standardised' }).click();
	await expect(trends).toHaveURL(/method=standardized/);
	await expect(chart).toHaveAttribute('data-method', 'standardized');
	await expect(trends.getByTestId('method-hint')).toContainText('distance from the centre in sigmas');
	await shoot(trends, 'trends-standardised-flash');
	const link = trends.url();
	const again = await context.newPage();
	await again.goto(link);
	await expect(again.getByTestId('control-chart')).toHaveAttribute('data-method', 'standardized');
	await expect(again.getByLabel('Defect type', { exact: true })).toHaveValue(d.types.FL!);
	await again.close();

	// Back to the u-chart of all types; a second page follows the Signals inbox of the part.
	await trends.getByLabel('Defect type', { exact: true }).selectOption({ label: 'All types' });
	// The method links carry the filters of the address: wait for it to drop the type first.
	await expect(trends).not.toHaveURL(/type=/);
	await trends.getByRole('link', { name: 'u-chart' }).click();
	await expect(chart).toHaveAttribute('data-method', 'u');
	await expect(trends).not.toHaveURL(/type=/);
	const signals = await context.newPage();
	await signals.goto(`/signals?part=${d.partId}`);
	await expect(signals.getByRole('heading', { name: 'Signals', level: 1 })).toBeVisible();
	for (const p of [trends, signals]) await expect(p.getByTestId('live-state')).toHaveAttribute('data-live', 'yes');
	const before = await pointCount(trends);

	// A bad sample closes elsewhere (3 defects on every unit: u = 3 against UCL ≈ 1.04).
	const bad = await closedSample(
		request,
		d,
		Array.from({ length: 5 }, () => ['SK', 'FL', 'WL'])
	);
	await expect(chart).toHaveAttribute('data-points', String(before + 1));
	const marker = chart.locator(`[data-testid="signal-marker"][data-index="${before}"]`);
	await expect(marker).toBeVisible();
	await marker.hover();
	await expect(trends.getByTestId('chart-tooltip')).toContainText('Above the upper control limit');
	await expect(trends.getByTestId('chart-tooltip')).toContainText('15 defects in 5');
	await expect(trends.getByTestId('signal-list').locator('li').first()).toContainText('Above the upper control limit');
	await shoot(trends, 'trends-live-signal');

	// The signal job raised it; the inbox shows it without a reload.
	await expect
		.poll(
			async () => {
				const { signals: list } = await (
					await request.get(`/api/v1/signals?part=${d.partId}&rule=beyond-limit`)
				).json();
				return (list as { sample: string }[]).some((s) => s.sample === bad.id);
			},
			{ timeout: 15_000 }
		)
		.toBe(true);
	const row = signals
		.getByTestId('signal-row')
		.filter({ has: signals.locator(`a[href="/trends/samples/${bad.id}"]`) })
		.filter({ hasText: 'Above the upper control limit' });
	await expect(row).toBeVisible({ timeout: 15_000 });
	await expect(row.getByTestId('signal-state')).toHaveText('New');

	// Explaining needs a cause: the server's words come back, then the explanation is kept.
	await row.getByRole('button', { name: 'Explain…' }).click();
	await row.getByLabel(/Assignable cause/).fill('no');
	await row.getByRole('button', { name: 'Save the explanation' }).click();
	await expect(row.getByRole('alert')).toContainText('at least 3 characters');
	await row.getByLabel(/Assignable cause/).fill('Resin lot 4411 was wet: the dryer had tripped overnight');
	await row.getByLabel('Action taken').fill('Dryer reset, lot re-dried 4 h, parts since then checked');
	await row.getByRole('button', { name: 'Save the explanation' }).click();
	await expect(row.getByTestId('signal-state')).toHaveText('Explained');
	await expect(row).toContainText('Resin lot 4411 was wet');
	await expect(signals.getByRole('status')).toContainText('explained');
	await shoot(signals, 'trends-signals-explained');

	// Trial limits from the samples on the chart: the explained cause is offered as the reason to leave the bad one out.
	await trends.getByRole('button', { name: 'Make trial limits' }).click();
	await expect(trends).toHaveURL(/limitSet=/);
	await expect(trends.getByTestId('trial-bar')).toBeVisible();
	await chart.locator(`[data-index="${before}"]`).click();
	await expect(trends.getByLabel('Assignable cause')).toHaveValue(/Resin lot 4411 was wet/);
	await trends.getByRole('button', { name: 'Leave it out' }).click();
	await expect(chart.locator(`[data-index="${before}"]`)).toHaveAttribute('data-excluded', 'yes');
	await trends.getByRole('button', { name: 'Recompute limits' }).click();
	await expect(trends.getByTestId('trial-bar')).toContainText('1 sample left out.');
	await expect(trends.getByRole('button', { name: 'Recompute limits' })).toBeDisabled();
	await shoot(trends, 'trends-trial-limits');
	await trends.getByRole('button', { name: 'Back to the chart in force' }).click();
	await expect(trends).not.toHaveURL(/limitSet=/);

	// Keyboard: the chart is one tab stop, arrows walk the samples, Enter opens the Bench sample.
	const last = chart.locator(`[data-index="${before}"]`);
	await chart.locator('[tabindex="0"]').focus();
	await trends.keyboard.press('End');
	await expect(last).toBeFocused();
	await trends.keyboard.press('Enter');
	await expect(trends).toHaveURL(new RegExp(`/trends/samples/${bad.id}`));
	await expect(trends.getByRole('heading', { level: 1 })).toContainText('FW-118');
	await expect(trends.getByTestId('sample-counts')).toContainText('SK');
	await expect(trends.getByRole('heading', { name: /Defects by type · 15/ })).toBeVisible();
	await trends.getByRole('button', { name: /^Unit 2,/ }).click();
	await expect(trends.getByRole('heading', { name: /Defects by type on unit 2 · 3/ })).toBeVisible();
	await expect(trends.getByTestId('bench-canvas')).toHaveAttribute('data-ready', 'yes');
	await shoot(trends, 'trends-sample');
	await trends.getByRole('link', { name: '← Back to Trends' }).click();
	await expect(trends).toHaveURL(new RegExp(`/trends\\?.*part=${d.partId}`));
	await context.close();
});

test('Trends fits a 768 px tablet; viewers read it without the limit panel', async ({ browser }) => {
	const tablet = await browser.newContext({ viewport: { width: 768, height: 1024 }, hasTouch: true });
	const page = await tablet.newPage();
	await signIn(page, 'engineer@example.com');
	await page.goto('/trends');
	await expect(page.getByTestId('control-chart')).toBeVisible();
	await expect(page.getByTestId('pareto-chart')).toBeVisible();
	expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(768);
	await shoot(page, 'trends-tablet');
	await page.goto('/signals');
	expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(768);
	await shoot(page, 'trends-signals-tablet');
	await tablet.close();

	const desk = await browser.newContext({ viewport: { width: 1280, height: 900 } });
	const viewer = await desk.newPage();
	await signIn(viewer, 'viewer@example.com');
	await viewer.goto('/trends');
	await expect(viewer.getByTestId('control-chart')).toBeVisible();
	await expect(viewer.getByTestId('limit-panel')).toHaveCount(0);
	await shoot(viewer, 'trends-viewer');
	await desk.close();
});

test('a live update arriving while a filter change loads does not undo the change', async ({ browser }) => {
	const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
	const page = await context.newPage();
	await signIn(page, 'engineer@example.com');
	const d = await demo(page.request);
	await page.goto(`/trends?part=${d.partId}`);
	await expect(page.getByTestId('control-chart')).toBeVisible();
	await expect(page.getByTestId('live-state')).toHaveAttribute('data-live', 'yes');

	// Hold the filter change's data request until a sample has closed elsewhere and its event
	// has reached the page, so the page's live refetch falls inside the navigation.
	let release!: () => void;
	const held = new Promise<void>((r) => (release = r));
	let heldOne = false;
	await page.route(
		(url) => url.pathname.endsWith('/trends/__data.json') && url.searchParams.has('type'),
		async (route) => {
			heldOne = true;
			await held;
			await route.continue();
		}
	);
	const dataRequests: URL[] = [];
	page.on('request', (r) => {
		const url = new URL(r.url());
		if (url.pathname.endsWith('/trends/__data.json')) dataRequests.push(url);
	});
	await page.getByLabel('Defect type', { exact: true }).selectOption({ label: 'FL · Flash' });
	await expect.poll(() => heldOne).toBe(true);
	await closedSample(page.request, d, [['FL']]);
	// Time for the event to arrive and the page to want its refetch (400 ms after the event).
	await page.waitForTimeout(1_500);
	release();

	await expect(page).toHaveURL(new RegExp(`type=${d.types.FL}`));
	await expect(page.getByRole('heading', { name: /Defects per unit, FL/ })).toBeVisible();
	// The live refetch came after the navigation, for the new filter; nothing asked for the old one.
	await expect.poll(() => dataRequests.length).toBeGreaterThanOrEqual(2);
	expect(dataRequests.map((u) => u.searchParams.get('type'))).toEqual(dataRequests.map(() => d.types.FL));
	await context.close();
});
