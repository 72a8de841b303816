import { expect, test } from '@playwright/test';
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import { demo } from './demo-api';
import { shoot, signIn } from './helpers';

test('an engineer reads the report of FW-118 and downloads it as a PDF, and the pins as CSV from Trends', async ({
	page
}) => {
	await page.setViewportSize({ width: 1280, height: 900 });
	await signIn(page, 'engineer@example.com');
	await page.getByRole('link', { name: 'Reports', exact: true }).first().click();
	await expect(page).toHaveURL(/\/reports/);
	const part = page.getByLabel('Part', { exact: true });
	const partId = await part.locator('option', { hasText: 'FW-118' }).getAttribute('value');
	if ((await part.inputValue()) !== partId) {
		await part.selectOption(partId!);
		await expect(page).toHaveURL(new RegExp(`part=${partId}`));
	}
	await expect(page.getByRole('heading', { name: /FW-118 · Vent grille cover/, level: 1 })).toBeVisible();
	await expect(page.locator('svg').first()).toBeVisible();
	await expect(page.getByText(/support, and do not replace/).first()).toBeVisible();
	await shoot(page, 'report-page');

	const [pdf] = await Promise.all([
		page.waitForEvent('download'),
		page.getByRole('link', { name: 'Download PDF' }).click()
	]);
	expect(pdf.suggestedFilename()).toMatch(/^stipple-report-FW-118-\d{4}-\d{2}-\d{2}-\d{4}-\d{2}-\d{2}\.pdf$/);
	const bytes = fs.readFileSync((await pdf.path())!);
	expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
	expect(bytes.length).toBeGreaterThan(20_000);

	await page.goto(`/trends?part=${partId}`);
	const [csv] = await Promise.all([
		page.waitForEvent('download'),
		page.getByRole('link', { name: 'Pins (CSV)' }).click()
	]);
	const text = fs.readFileSync((await csv.path())!, 'utf8');
	const [header, first] = text.split(/\r?\n/);
	expect(header).toBe(
		'sample,unit,view,revision,type,type_name,x,y,zone,regions,inspector,source,time,sample_taken_at'
	);
	expect(first).toMatch(/^[0-9a-f-]{36},\d+,/);
});

test('an admin makes a station key, the station posts a sample with it, and a revoked key is refused', async ({
	page
}) => {
	await page.setViewportSize({ width: 1280, height: 900 });
	await signIn(page, 'admin@example.com');
	await page.goto('/setup/stations');
	await page.getByLabel('Station name').fill('Camera, line 2');
	await page.getByRole('checkbox', { name: /FW-118/ }).check();
	await page.getByRole('button', { name: 'Make the key' }).click();
	const secret = await page.getByLabel('Station key', { exact: true }).inputValue();
	expect(secret).toMatch(/^stk_/);
	await expect(page.getByText('It will not be shown again')).toBeVisible();
	await shoot(page, 'stations-key-made');

	const d = await demo(page.request);
	const { views } = await (await page.request.get(`/api/v1/parts/${d.partId}/views`)).json();
	const front = (views as { id: string; name: string }[]).find((v) => v.name === 'Front')!;
	const body = {
		id: randomUUID(),
		partId: d.partId,
		size: 5,
		pins: [{ id: randomUUID(), unitIndex: 2, viewId: front.id, defectType: 'SK', x: 0.42, y: 0.61 }]
	};
	const post = () =>
		page.request.post('/api/v1/station/samples', {
			headers: { authorization: `Bearer ${secret}`, cookie: '' },
			data: body
		});
	const first = await post();
	expect(first.status(), await first.text()).toBe(201);
	expect((await post()).status()).toBe(200);

	// The Front view's frame mapping, set by clicking three points on the drawing and typing the station's pixels.
	await page.goto('/setup/stations');
	await page.getByRole('link', { name: 'Set the mapping' }).first().click();
	const drawing = page.getByRole('button', { name: /on the drawing$/ });
	await expect(drawing.locator('img')).toBeVisible();
	const box = (await drawing.boundingBox())!;
	const spots = [
		[0.2, 0.2, 200, 200],
		[0.8, 0.2, 800, 200],
		[0.2, 0.8, 200, 800]
	] as const;
	for (const [x, y] of spots) await page.mouse.click(box.x + x * box.width, box.y + y * box.height);
	for (const [i, [, , fx, fy]] of spots.entries()) {
		await page.getByLabel('Image x, px').nth(i).fill(String(fx));
		await page.getByLabel('Image y, px').nth(i).fill(String(fy));
	}
	await page.getByRole('radio', { name: /Affine/ }).check();
	await shoot(page, 'stations-mapping');
	await page.getByRole('button', { name: 'Save the mapping' }).click();
	await expect(page.getByText(/^Saved\./)).toBeVisible();

	// A pin sent in the station's pixels lands mid-drawing: (500, 500) px → about (0.5, 0.5).
	const mapped = await page.request.post('/api/v1/station/samples', {
		headers: { authorization: `Bearer ${secret}`, cookie: '' },
		data: {
			id: randomUUID(),
			partId: d.partId,
			size: 5,
			pins: [{ id: randomUUID(), unitIndex: 1, viewId: front.id, defectType: 'SK', frame: { x: 500, y: 500 } }]
		}
	});
	expect(mapped.status(), await mapped.text()).toBe(201);
	const stored = await (await page.request.get(`/api/v1/samples/${(await mapped.json()).sample.id}`)).json();
	expect(stored.sample.pins[0].x).toBeCloseTo(0.5, 1);
	expect(stored.sample.pins[0].y).toBeCloseTo(0.5, 1);

	await page.goto('/setup/stations');
	const card = page.locator('[id^="key-"]', { hasText: 'Camera, line 2' });
	await expect(card).not.toContainText('never');
	await card.getByRole('link', { name: 'Revoke…' }).click();
	await page.getByRole('button', { name: 'Revoke the key' }).click();
	await expect(page.locator('[id^="key-"]', { hasText: 'Camera, line 2' })).toContainText(/revoked/i);
	const refused = await post();
	expect(refused.status()).toBe(401);
	await shoot(page, 'stations-revoked');
});

test('the API page reads signed out, from the same description as openapi.json', async ({ page }) => {
	await page.setViewportSize({ width: 1280, height: 900 });
	await page.goto('/api-docs');
	await expect(page.getByRole('heading', { name: /Stipple API/, level: 1 })).toBeVisible();
	await expect(page.getByRole('heading', { name: 'A station posts a sample' })).toBeVisible();
	await expect(page.getByText('Authorization: Bearer stk_').first()).toBeVisible();
	const spec = await (await page.request.get('/api/v1/openapi.json')).json();
	const operations = Object.values(spec.paths as Record<string, object>).reduce(
		(n, item) => n + Object.keys(item).length,
		0
	);
	await expect(page.getByText(`${operations} operations`)).toBeVisible();
	await shoot(page, 'api-docs');
});
