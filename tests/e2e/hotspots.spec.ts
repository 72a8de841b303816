import { expect, test, type Page } from '@playwright/test';
import { closedSample, demo } from './demo-api';
import { shoot, signIn } from './helpers';

/** Opens Hot spots for the demo part FW-118 and waits for the map to be drawn. */
async function openFw118(page: Page) {
	await page.goto('/hotspots');
	await expect(page.getByRole('heading', { name: 'Hot spots', level: 1 })).toBeVisible();
	const part = page.getByLabel('Part', { exact: true });
	const value = await part.locator('option', { hasText: 'FW-118' }).getAttribute('value');
	if ((await part.inputValue()) !== value) {
		await part.selectOption(value!);
		await expect(page).toHaveURL(new RegExp(`part=${value}`));
	}
	await expect(page.getByRole('heading', { name: /FW-118 · Front/ })).toBeVisible();
	await expect(page.locator('canvas').first()).toBeVisible();
}

test('a toolmaker finds the worn gate of cavity 3 on the Front view', async ({ page }) => {
	await page.setViewportSize({ width: 1280, height: 900 });
	await signIn(page, 'toolmaker@example.com');
	await openFw118(page);
	await shoot(page, 'hotspots-all');

	await page.getByLabel('Cavity').selectOption('3');
	await expect(page).toHaveURL(/cavity=3/);
	await expect(page.getByLabel(/^Legend:/).first()).toContainText('per 100 units');

	// Rows are lettered A–E from the top of the 8 × 5 grid: the gate sits at the bottom.
	const zones = page.getByRole('tabpanel').getByRole('table');
	const top = zones.locator('tbody tr').first().locator('td').nth(1);
	await expect(top).toHaveText(/^[DE]\d$/);
	const href = await top.getByRole('link').getAttribute('href');
	expect(href).toMatch(/^\/trends\?part=[^&]+&zone=[DE]\d/);
	expect(href).toContain('cavity=3');
	await expect(page.getByTestId('clark-evans')).toContainText(/clustered|random|regular/);
	await expect(page.getByTestId('clark-evans')).toContainText('Clark–Evans');
	await expect(page.getByText(/Defects are not spread evenly by area|could have fallen evenly/)).toBeVisible();

	await page.getByRole('button', { name: 'Show all 40 zones' }).click();
	await expect(zones.locator('tbody tr')).toHaveCount(40);
	// Sorting by a header.
	await page.getByRole('button', { name: 'Pins', exact: true }).click();
	await expect(zones.locator('th[aria-sort="descending"]')).toContainText('Pins');
	await shoot(page, 'hotspots-cavity-3');

	// The pins themselves, over the map, on demand.
	await page.getByLabel(/Show the pins/).check();
	await expect(page.getByRole('img', { name: /^Density map/ })).not.toHaveAttribute('data-pins', '0');
	await shoot(page, 'hotspots-pins');
	await page.getByLabel(/Show the pins/).uncheck();

	await page.getByRole('tab', { name: 'Regions' }).click();
	await expect(page.getByRole('tab', { name: 'Regions' })).toHaveAttribute('aria-selected', 'true');
	const gate = page.getByRole('tabpanel').getByRole('link', { name: 'Gate side' });
	await expect(gate).toBeVisible();
	expect(await gate.getAttribute('href')).toContain('region=Gate+side');

	// The bandwidth slider redraws from the API without reloading the page.
	const slider = page.getByLabel(/Smoothing \(bandwidth\)/);
	await slider.fill('0.1');
	await slider.dispatchEvent('change');
	await expect(page).toHaveURL(/bandwidth=0.1/);
	await expect(page.getByRole('button', { name: "Back to Scott's rule" })).toBeVisible();

	// Period compare: A the last three weeks (worn gate), B the weeks before.
	const day = (offset: number) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);
	await page.getByLabel('Period A from').fill(day(-21));
	await page.getByLabel('Compare with B from').fill(day(-56));
	await page.getByLabel('B before').fill(day(-21));
	await page.getByRole('button', { name: 'Show' }).click();
	await expect(page).toHaveURL(/bfrom=.*bandwidth=0.1|bandwidth=0.1.*bfrom=/);
	await expect(page.getByRole('heading', { name: /period A minus period B/ })).toBeVisible();
	await expect(page.getByLabel(/^Legend: A − B/)).toBeVisible();
	await expect(page.getByRole('img', { name: /(Difference|density) map/ })).toHaveCount(3);
	await shoot(page, 'hotspots-compare');

	await page.setViewportSize({ width: 768, height: 1024 });
	await expect(page.getByRole('tab', { name: 'Grid zones' })).toBeVisible();
	await shoot(page, 'hotspots-compare-768');

	// The map and the table download with the filters on screen.
	const csv = await page.request.get(
		(await page.getByRole('link', { name: 'Download the zone table (CSV)' }).getAttribute('href'))!
	);
	expect([csv.status(), csv.headers()['content-type']]).toEqual([200, 'text/csv; charset=utf-8']);
	expect(await csv.text()).toContain('kind,zone,pins,units,defects_per_unit,expected,residual,share');
	const png = await page.request.get(
		(await page.getByRole('link', { name: 'Download the map (PNG)' }).getAttribute('href'))!
	);
	expect([png.status(), png.headers()['content-type']]).toEqual([200, 'image/png']);

	// From here a repair request starts with the cavity and the hot zones filled in.
	await page.getByRole('link', { name: 'Request a repair for these zones' }).click();
	await expect(page).toHaveURL(/\/repairs\/new\?.*cavity=3/);
	expect(new URL(page.url()).searchParams.getAll('zone').length).toBeGreaterThan(0);
});

test('a viewer reads the hot spots at tablet width, and they follow a sample closed elsewhere', async ({
	page,
	browser
}) => {
	await page.setViewportSize({ width: 768, height: 1024 });
	await signIn(page, 'viewer@example.com');
	await openFw118(page);
	await expect(page.getByRole('tabpanel').getByRole('table')).toBeVisible();
	await expect(page.getByTestId('clark-evans')).toBeVisible();
	await expect(page.getByText(/support, and do not replace/)).toBeVisible();
	await expect(page.getByRole('link', { name: 'Request a repair for these zones' })).toHaveCount(0);
	await shoot(page, 'hotspots-viewer-768');

	// A sample with two pins closes on the line: the open map counts them without a reload.
	await expect(page.getByTestId('live-state')).toHaveAttribute('data-live', 'yes');
	const counts = page.getByTestId('map-counts');
	const before = Number(await counts.getAttribute('data-pins'));
	const line = await browser.newContext({ baseURL: new URL(page.url()).origin });
	const engineer = await line.newPage();
	await signIn(engineer, 'engineer@example.com');
	await closedSample(engineer.request, await demo(engineer.request), [['SK'], ['FL']]);
	await line.close();
	// At least these two (closing first finishes any sample an earlier test left open, with its pins).
	await expect.poll(async () => Number(await counts.getAttribute('data-pins'))).toBeGreaterThanOrEqual(before + 2);
});
