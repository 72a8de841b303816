/**
 * The Bench away from the happy path: roles that may not write, changes the server refuses
 * (sample closed elsewhere, type retired meanwhile), an engineer's correction of a closed
 * sample, and the keyboard path.
 */
import { expect, test, type APIRequestContext, type Browser, type Page } from '@playwright/test';
import { shoot, signIn } from './helpers';

async function signedIn(browser: Browser, email: string) {
	const context = await browser.newContext();
	const page = await context.newPage();
	await signIn(page, email);
	return { context, page, api: page.request };
}

async function demoPart(api: APIRequestContext) {
	const { parts } = await (await api.get('/api/v1/parts?q=FW-118')).json();
	const part = parts[0] as { id: string };
	const { views } = await (await api.get(`/api/v1/parts/${part.id}/views`)).json();
	const front = views.find((v: { name: string }) => v.name === 'Front').revisions[0] as {
		id: string;
		width: number;
		height: number;
	};
	return { partId: part.id, front };
}

async function openBench(page: Page) {
	await page.goto('/bench');
	await page.getByRole('radio', { name: /FW-118/ }).check();
	await page.getByRole('button', { name: 'Start inspecting' }).click();
	await expect(page).toHaveURL(/\/bench\/[0-9a-f-]{36}$/);
	await expect(page.getByTestId('bench-canvas')).toHaveAttribute('data-ready', 'yes');
	return page.url().split('/').pop()!;
}

async function drawingRect(page: Page, view: { width: number; height: number }) {
	const box = (await page.getByTestId('bench-canvas').locator('canvas').first().boundingBox())!;
	const fit = Math.min(box.width / view.width, box.height / view.height);
	return { x: box.x, y: box.y, w: view.width * fit, h: view.height * fit };
}

async function storedPins(api: APIRequestContext, sampleId: string) {
	return (await (await api.get(`/api/v1/samples/${sampleId}`)).json()).sample.pins as {
		id: string;
		x: number;
		y: number;
		defectTypeId: string;
	}[];
}

test('viewers and toolmakers cannot start samples or write pins (403)', async ({ browser }) => {
	const inspector = await signedIn(browser, 'inspector@example.com');
	const { partId, front } = await demoPart(inspector.api);
	const started = await inspector.api.post('/api/v1/samples', { data: { partId } });
	expect(started.ok()).toBe(true);
	const sampleId = (await started.json()).sample.id as string;
	const { defectTypes } = await (await inspector.api.get('/api/v1/defect-types')).json();
	const pin = {
		id: crypto.randomUUID(),
		unitIndex: 1,
		revisionId: front.id,
		defectTypeId: defectTypes[0].id,
		x: 0.5,
		y: 0.5
	};
	const placed = await inspector.api.post(`/api/v1/samples/${sampleId}/pins`, { data: pin });
	expect(placed.status()).toBe(201);

	for (const email of ['viewer@example.com', 'toolmaker@example.com']) {
		const other = await signedIn(browser, email);
		const answers = [
			await other.api.post('/api/v1/samples', { data: { partId } }),
			await other.api.post(`/api/v1/samples/${sampleId}/pins`, { data: { ...pin, id: crypto.randomUUID() } }),
			await other.api.patch(`/api/v1/pins/${pin.id}`, { data: { note: 'mine' } }),
			await other.api.delete(`/api/v1/pins/${pin.id}`),
			await other.api.patch(`/api/v1/samples/${sampleId}/units/2`, { data: { clean: true } }),
			await other.api.post(`/api/v1/samples/${sampleId}/close`),
			await other.api.put(`/api/v1/pins/${pin.id}/photos/${crypto.randomUUID()}`, {
				data: Buffer.from('not sent far'),
				headers: { 'content-type': 'image/jpeg' }
			})
		];
		for (const res of answers) {
			expect(res.status(), `${email} ${res.url()}`).toBe(403);
			expect((await res.json()).error.code).toBe('forbidden');
		}
		// Reading is fine for both.
		expect((await other.api.get(`/api/v1/samples/${sampleId}`)).status()).toBe(200);
		await other.context.close();
	}
	expect(await storedPins(inspector.api, sampleId)).toHaveLength(1);
	await inspector.api.delete(`/api/v1/pins/${pin.id}`);
	await inspector.context.close();
});

test('a pin refused by the server (sample closed elsewhere, type retired) is shown and taken off the drawing', async ({
	browser
}) => {
	const engineer = await signedIn(browser, 'engineer@example.com');
	const code = `RT${Date.now().toString(36).slice(-5).toUpperCase()}`;
	const created = await engineer.api.post('/api/v1/defect-types', {
		data: { code, name: 'Retired soon', colour: 'orchid', shape: 'star', severity: 'D', allParts: true }
	});
	expect(created.status()).toBe(201);
	const retiring = (await created.json()).defectType.id as string;

	const inspector = await signedIn(browser, 'inspector@example.com');
	const { front } = await demoPart(inspector.api);
	const sampleId = await openBench(inspector.page);
	const page = inspector.page;
	const canvas = page.getByTestId('bench-canvas');

	// The type is retired while the Bench still offers it.
	expect((await engineer.api.patch(`/api/v1/defect-types/${retiring}`, { data: { retired: true } })).ok()).toBe(true);
	await page.getByRole('radio', { name: new RegExp(code) }).click();
	let r = await drawingRect(page, front);
	await page.mouse.click(r.x + 0.4 * r.w, r.y + 0.4 * r.h);
	await expect(page.getByRole('alert').filter({ hasText: `Not saved: ${code} on unit 1` })).toContainText(/retired/);
	await expect(canvas).toHaveAttribute('data-pins', '0');
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/);

	// Someone else finishes the sample (every unit clean) while the inspector still has it open.
	for (let i = 1; i <= 5; i++) {
		await engineer.api.patch(`/api/v1/samples/${sampleId}/units/${i}`, { data: { clean: true } });
	}
	expect((await engineer.api.post(`/api/v1/samples/${sampleId}/close`)).ok()).toBe(true);
	await page.getByRole('radio', { name: /Scratch/ }).click();
	r = await drawingRect(page, front);
	await page.mouse.click(r.x + 0.6 * r.w, r.y + 0.6 * r.h);
	await expect(page.getByRole('alert').filter({ hasText: 'Not saved: SC on unit 1' })).toContainText(/closed/);
	await expect(canvas).toHaveAttribute('data-pins', '0');
	await expect(page.getByText('closed', { exact: true })).toBeVisible();
	await expect(page.getByRole('button', { name: 'Finish sample…' })).toHaveCount(0);
	await shoot(page, 'bench-conflicts');
	expect(await storedPins(inspector.api, sampleId)).toHaveLength(0);
	await inspector.context.close();
	await engineer.context.close();
});

test('an engineer corrects a pin of a closed sample, with a reason that lands in the audit trail', async ({
	browser
}) => {
	const inspector = await signedIn(browser, 'inspector@example.com');
	const { front } = await demoPart(inspector.api);
	const sampleId = await openBench(inspector.page);
	await inspector.page.getByRole('radio', { name: /Flash/ }).click();
	const r = await drawingRect(inspector.page, front);
	await inspector.page.mouse.click(r.x + 0.3 * r.w, r.y + 0.3 * r.h);
	for (let i = 2; i <= 5; i++) {
		await inspector.page.getByRole('tab', { name: new RegExp(`^Unit ${i},`) }).click();
		await inspector.page.getByRole('button', { name: `Unit ${i} is clean` }).click();
	}
	await expect(inspector.page.getByTestId('sync-state')).toHaveText(/All saved/);
	expect((await inspector.api.post(`/api/v1/samples/${sampleId}/close`)).ok()).toBe(true);
	await inspector.context.close();

	const engineer = await signedIn(browser, 'engineer@example.com');
	const page = engineer.page;
	await page.goto(`/bench/${sampleId}`);
	await expect(page.getByTestId('bench-canvas')).toHaveAttribute('data-ready', 'yes');
	const reason = 'Flash was on the gate side; checked against the part.';
	await page.getByLabel('Why do the pins of this closed sample change?').fill(reason);
	await page.getByRole('button', { name: 'Correct pins' }).click();
	await expect(page.getByRole('button', { name: 'Done correcting' })).toBeVisible();

	// Tap the pin to pick it, then drag it from (0.3, 0.3) to (0.7, 0.5).
	let box = await drawingRect(page, front);
	await page.mouse.click(box.x + 0.3 * box.w, box.y + 0.3 * box.h);
	await expect(page.getByRole('complementary', { name: 'Selected pin' })).toBeVisible();
	box = await drawingRect(page, front); // the pin panel took room beside the drawing
	await page.mouse.move(box.x + 0.3 * box.w, box.y + 0.3 * box.h);
	await page.mouse.down();
	await page.mouse.move(box.x + 0.5 * box.w, box.y + 0.4 * box.h, { steps: 5 });
	await page.mouse.move(box.x + 0.7 * box.w, box.y + 0.5 * box.h, { steps: 5 });
	await page.mouse.up();
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/);
	await shoot(page, 'bench-correcting');
	const [moved] = await storedPins(engineer.api, sampleId);
	expect(Math.abs(moved!.x - 0.7)).toBeLessThan(0.005);
	expect(Math.abs(moved!.y - 0.5)).toBeLessThan(0.005);

	const { changes } = await (await engineer.api.get(`/api/v1/samples/${sampleId}/changes`)).json();
	expect(changes).toEqual([expect.objectContaining({ action: 'pin.update', reason, by: 'Dev Raman' })]);
	await engineer.context.close();
});

test('the keyboard alone picks a type, places, picks and removes a pin, and moves to the next unit', async ({
	browser
}) => {
	const inspector = await signedIn(browser, 'inspector@example.com');
	const page = inspector.page;
	const sampleId = await openBench(page);
	await expect(page.getByTestId('bench-keys')).toBeVisible();
	await page.getByTestId('bench-canvas').focus();
	await page.keyboard.press('2'); // the second type in the palette
	await expect(page.getByRole('radio').nth(1)).toBeChecked();
	await page.keyboard.press('ArrowRight'); // the crosshair appears at the centre, then steps 1 %
	for (let i = 0; i < 2; i++) await page.keyboard.press('Shift+ArrowRight'); // 5 % steps
	await page.keyboard.press('ArrowDown');
	await page.keyboard.press('Enter');
	await expect(page.getByTestId('bench-canvas')).toHaveAttribute('data-pins', '1');
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/);
	const [pin] = await storedPins(inspector.api, sampleId);
	// 0.5 + 0.01 + 2 × 0.05 = 0.61 across, 0.5 + 0.01 = 0.51 down.
	expect([pin!.x, pin!.y].map((v) => Math.round(v * 100) / 100)).toEqual([0.61, 0.51]);

	await page.keyboard.press(' ');
	await expect(page.getByRole('complementary', { name: 'Selected pin' })).toBeVisible();
	await page.getByTestId('bench-canvas').focus();
	await page.keyboard.press('Backspace');
	await expect(page.getByTestId('bench-canvas')).toHaveAttribute('data-pins', '0');
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/);
	expect(await storedPins(inspector.api, sampleId)).toHaveLength(0);

	await page.keyboard.press('n');
	await expect(page.getByRole('tab', { name: /^Unit 2,/ })).toHaveAttribute('aria-selected', 'true');
	// Leave no open sample behind for the other tests of this inspector.
	for (let i = 1; i <= 5; i++) {
		await inspector.api.patch(`/api/v1/samples/${sampleId}/units/${i}`, { data: { clean: true } });
	}
	expect((await inspector.api.post(`/api/v1/samples/${sampleId}/close`)).ok()).toBe(true);
	await inspector.context.close();
});
