import { expect, test, type Page } from '@playwright/test';
import sharp from 'sharp';
import { shoot, signIn } from './helpers';

/** A made-up photo of a tool insert: a grey field with a darker block, 1600 × 1200. */
const photoFixture = () =>
	sharp({ create: { width: 1600, height: 1200, channels: 3, background: { r: 140, g: 140, b: 135 } } })
		.composite([
			{
				input: { create: { width: 600, height: 400, channels: 3, background: { r: 60, g: 60, b: 60 } } },
				left: 500,
				top: 400
			}
		])
		.png()
		.toBuffer();

/** The calendar day `offset` days from today, as a date input holds it. */
function isoDay(offset: number) {
	const d = new Date(Date.now() + offset * 86_400_000);
	const pad = (n: number) => String(n).padStart(2, '0');
	return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}

/** Opens the demo's repair of MQ-4 cavity 3 from the queue. */
async function openDemoRepair(page: Page) {
	await page.goto('/repairs?state=all');
	const row = page.getByTestId('repair-row').filter({ hasText: 'MQ-4 · cavity 3' });
	await expect(row).toHaveCount(1);
	await row.getByRole('link').click();
	await expect(page).toHaveURL(/\/repairs\/[0-9a-f-]{36}$/);
	await expect(page.getByRole('heading', { name: 'MQ-4 · cavity 3', level: 1 })).toBeVisible();
}

async function expectEvidenceImage(page: Page) {
	const img = page.getByTestId('evidence-image');
	await expect(img).toBeVisible();
	await expect
		.poll(() => img.evaluate((i: HTMLImageElement) => (i.complete ? i.naturalWidth : 0)), { timeout: 15_000 })
		.toBeGreaterThan(0);
}

test('a viewer reads the demo repair but has nothing to press', async ({ page }) => {
	await page.setViewportSize({ width: 1280, height: 900 });
	await signIn(page, 'viewer@example.com');
	await openDemoRepair(page);
	await expect(page.getByTestId('places')).toContainText('Gate side');
	await expectEvidenceImage(page);
	await expect(page.getByRole('button', { name: /Accept|Mark done|Verified|Not verified/ })).toHaveCount(0);
	await expect(page.getByLabel('What was done')).toHaveCount(0);
	await page.goto('/repairs');
	await expect(page.getByRole('link', { name: 'Request a repair' })).toHaveCount(0);
	await expect(page.getByTestId('my-queue')).toHaveCount(0);
});

test('a toolmaker finds the gate repair from Hot spots, marks it done with a photo, and sees the rate drop', async ({
	page
}) => {
	await page.setViewportSize({ width: 1280, height: 900 });
	await signIn(page, 'toolmaker@example.com');
	// The queue first: the demo's repair waits in the toolmaker's own list.
	await page.getByRole('link', { name: 'Repairs', exact: true }).first().click();
	await expect(page.getByRole('heading', { name: 'Repairs', level: 1 })).toBeVisible();
	await page.getByTestId('my-queue').click();
	await expect(page).toHaveURL(/mine=1/);
	await expect(page.getByTestId('my-queue')).toHaveAttribute('aria-checked', 'true');
	const row = page.getByTestId('repair-row').filter({ hasText: 'MQ-4 · cavity 3' });
	await expect(row).toHaveCount(1);
	await expect(row).toContainText('Gate side');
	await expect(row).toContainText('FW-118');
	await expect(row.getByTestId('repair-state')).toHaveText('Accepted');
	await shoot(page, 'repairs-queue');

	// Hot spots for the mould's cavity 3: the hot zone sits at the gate, and the repair is listed beside it.
	await page.getByRole('link', { name: 'Hot spots', exact: true }).first().click();
	const part = page.getByLabel('Part', { exact: true });
	const partId = await part.locator('option', { hasText: 'FW-118' }).getAttribute('value');
	if ((await part.inputValue()) !== partId) await part.selectOption(partId!);
	const tool = page.getByLabel('Tool', { exact: true });
	await tool.selectOption({ label: (await tool.locator('option', { hasText: 'MQ-4' }).textContent())!.trim() });
	await expect(page).toHaveURL(/tool=/);
	await page.getByLabel('Cavity').selectOption('3');
	await expect(page).toHaveURL(/cavity=3/);
	const top = page.getByRole('tabpanel').getByRole('table').locator('tbody tr').first().locator('td').nth(1);
	await expect(top).toHaveText(/^[DE]\d$/);
	const listed = page.getByTestId('tool-repair').filter({ hasText: 'MQ-4 · cavity 3' });
	await expect(listed).toHaveCount(1);
	await expect(listed.getByTestId('repair-state')).toHaveText('Accepted');
	await shoot(page, 'repairs-from-hotspots');
	await listed.click();

	await expect(page.getByRole('heading', { name: 'MQ-4 · cavity 3', level: 1 })).toBeVisible();
	await expectEvidenceImage(page);
	const counts = page.getByTestId('evidence-counts');
	await expect(counts).toContainText('Defects');
	await expect(counts).toContainText('Units inspected');
	expect(Number(await counts.locator('dd').first().textContent())).toBeGreaterThan(0);
	await expect(page.getByTestId('note')).toContainText('gate insert looks worn');
	await shoot(page, 'repairs-detail-accepted');

	// A photo of the repaired insert goes with "done"; the browser shrinks it first.
	await page.getByTestId('photo-file').setInputFiles({
		name: 'insert.png',
		mimeType: 'image/png',
		buffer: await photoFixture()
	});
	await expect(page.getByTestId('chosen-photos').locator('img')).toHaveCount(1);
	// A date in the future is refused by the browser's own limit; the real one is 14 days ago.
	await expect(page.getByLabel('Repair date')).toHaveAttribute('max', isoDay(0));
	await page.getByLabel('Repair date').fill(isoDay(-14));
	await page.getByLabel('What was done').fill('Gate insert of cavity 3 replaced, gate land re-polished.');
	await page.getByRole('button', { name: 'Mark done' }).click();

	await expect(page.getByTestId('repair-state')).toHaveText('Done, to verify');
	const panel = page.getByTestId('verification');
	await expect(panel).toBeVisible();
	await expect(page.getByTestId('verdict')).toHaveAttribute('data-verdict', 'dropped');
	await expect(page.getByTestId('verdict')).toContainText('The rate dropped');
	await expect(page.getByTestId('verification-caution')).toContainText(/do not replace|does not replace|not replace/);
	await expect(page.getByTestId('p-dropped')).toContainText('p ');
	await expect(page.getByTestId('ratio-interval')).toContainText('–');
	await expect(page.getByTestId('rate-before')).toBeVisible();
	await expect(page.getByTestId('rate-after')).toBeVisible();
	await expect(page.getByTestId('work-done')).toContainText('Gate insert of cavity 3 replaced');
	const photo = page.getByTestId('repair-photos').locator('img');
	await expect(photo).toHaveCount(1);
	await expect
		.poll(() => photo.evaluate((i: HTMLImageElement) => (i.complete ? i.naturalWidth : 0)), { timeout: 15_000 })
		.toBeGreaterThan(0);
	await shoot(page, 'repairs-verification');

	// The map before and after, with the zones that changed.
	const compare = page.getByRole('link', { name: 'Compare the map before and after the repair' });
	const back = page.url();
	await compare.click();
	await expect(page.getByRole('heading', { name: /period A minus period B/ })).toBeVisible();
	await expect(page.getByTestId('zone-changes')).toBeVisible();
	await page.getByRole('tab', { name: 'Regions' }).click();
	const gate = page.getByTestId('zone-changes').locator('tr', { hasText: 'Gate side' });
	await expect(gate).toContainText('lower in A');
	await shoot(page, 'repairs-compare');
	await page.goto(back);

	await page.getByLabel('Note (optional)').fill('40 parts of cavity 3 checked by eye too: no short shots.');
	await page.getByRole('button', { name: 'Verified', exact: true }).click();
	await expect(page.getByTestId('repair-state')).toHaveText('Verified');
	await expect(page.getByRole('button', { name: 'Verified', exact: true })).toHaveCount(0);
	await expect(page.getByTestId('verification')).toContainText('40 parts of cavity 3');
	await expect(page.getByTestId('timeline')).toContainText('Verified');

	await page.setViewportSize({ width: 768, height: 1024 });
	await shoot(page, 'repairs-verified-768');

	await page.goto('/repairs?state=verified');
	await expect(page.getByTestId('repair-row').filter({ hasText: 'MQ-4 · cavity 3' })).toHaveCount(1);
	await shoot(page, 'repairs-queue-verified-768');
});

test('an engineer requests a repair of cavity 1, zone B3', async ({ page }) => {
	await page.setViewportSize({ width: 768, height: 1024 });
	await signIn(page, 'engineer@example.com');
	await page.goto('/repairs');
	await page.getByRole('link', { name: 'Request a repair' }).click();
	await expect(page.getByRole('heading', { name: 'Request a repair', level: 1 })).toBeVisible();

	const part = page.getByLabel('Part', { exact: true });
	const value = await part.locator('option', { hasText: 'FW-118' }).getAttribute('value');
	if ((await part.inputValue()) !== value) {
		await part.selectOption(value!);
		await expect(page).toHaveURL(new RegExp(`part=${value}`));
	}
	const tool = page.getByLabel('Tool', { exact: true });
	await tool.selectOption({ label: (await tool.locator('option', { hasText: 'MQ-4' }).textContent())!.trim() });
	await page.getByLabel('Cavity', { exact: true }).selectOption('1');
	await page.getByLabel('Grid zones').fill('b3');
	await page.getByLabel('Note for the toolroom').fill('Sink marks around zone B3 on cavity 1.');
	await page.getByLabel('Assign to').selectOption({ index: 1 });
	await shoot(page, 'repairs-new-768');

	// Nothing said about where: refused with the reason.
	await page.getByLabel('Grid zones').fill('');
	await page.getByRole('button', { name: 'Request the repair' }).click();
	await expect(page.getByRole('alert')).toContainText('Please check the fields');
	await expect(page.getByText('Say which zones or regions the repair is about.')).toBeVisible();

	await page.getByLabel('Grid zones').fill('b3');
	await page.getByRole('button', { name: 'Request the repair' }).click();
	await expect(page).toHaveURL(/\/repairs\/[0-9a-f-]{36}$/);
	await expect(page.getByRole('heading', { name: 'MQ-4 · cavity 1', level: 1 })).toBeVisible();
	await expect(page.getByTestId('repair-state')).toHaveText('Requested');
	await expect(page.getByTestId('places')).toContainText('B3');
	await expectEvidenceImage(page);
	await expect(page.getByRole('button', { name: 'Accept' })).toBeVisible();
	await shoot(page, 'repairs-requested-768');

	await page.goto('/repairs');
	const row = page.getByTestId('repair-row').filter({ hasText: 'MQ-4 · cavity 1' });
	await expect(row).toHaveCount(1);
	await expect(row).toContainText('B3');
	await expect(row.getByTestId('repair-state')).toHaveText('Requested');
	await page.setViewportSize({ width: 1280, height: 900 });
	await shoot(page, 'repairs-queue-open');
});

test('an open Repairs queue follows a repair accepted elsewhere, without a reload', async ({ page, browser }) => {
	await page.setViewportSize({ width: 1280, height: 900 });
	await signIn(page, 'viewer@example.com');
	await page.goto('/repairs');
	const row = page.getByTestId('repair-row').filter({ hasText: 'MQ-4 · cavity 1' });
	await expect(row.getByTestId('repair-state')).toHaveText('Requested');
	await expect(page.getByTestId('live-state')).toHaveAttribute('data-live', 'yes');

	const other = await browser.newContext({ baseURL: new URL(page.url()).origin });
	const toolmaker = await other.newPage();
	await signIn(toolmaker, 'toolmaker@example.com');
	const id = (await row.getByRole('link').getAttribute('href'))!.split('/').pop()!;
	const res = await toolmaker.request.post(`/api/v1/repairs/${id}`, { data: { action: 'accept' } });
	expect(res.status()).toBe(200);
	await other.close();

	await expect(row.getByTestId('repair-state')).toHaveText('Accepted');
});
