import { expect, test, type Page } from '@playwright/test';
import sharp from 'sharp';
import { shoot, signIn } from './helpers';

async function canvasBox(page: Page) {
	const canvas = page.getByTestId('bench-canvas').locator('canvas').first();
	await expect(page.getByTestId('bench-canvas')).toHaveAttribute('data-ready', 'yes');
	await expect(canvas).toBeInViewport({ ratio: 1 });
	return (await canvas.boundingBox())!;
}

/** The drawing's rectangle inside the canvas: fitted, centred at zoom 1 from the top-left. */
async function drawingRect(page: Page, view: { width: number; height: number }) {
	const box = await canvasBox(page);
	const fit = Math.min(box.width / view.width, box.height / view.height);
	return { x: box.x, y: box.y, w: view.width * fit, h: view.height * fit };
}

/** A photo as a tablet's camera would make it: 3000 × 2000 JPEG. */
const cameraPhoto = () =>
	sharp({ create: { width: 3000, height: 2000, channels: 3, background: { r: 120, g: 110, b: 100 } } })
		.jpeg()
		.toBuffer();

async function startSample(page: Page, email: string) {
	await signIn(page, email);
	await page.goto('/bench');
	await page.getByRole('radio', { name: /FW-118/ }).check();
	await page.getByRole('button', { name: 'Start inspecting' }).click();
	await expect(page).toHaveURL(/\/bench\/[0-9a-f-]{36}$/);
	return page.url().split('/').pop()!;
}

test('an inspector pins 7 defects of 3 types on two views, marks a clean unit and finishes the sample', async ({
	page
}) => {
	const sampleId = await startSample(page, 'inspector@example.com');
	const views = (await (await page.request.get(`/api/v1/samples/${sampleId}`)).json()).sample;
	expect(views.unitCount).toBe(5);
	const partViews = (await (await page.request.get(`/api/v1/parts/${views.partId}/views`)).json()).views as {
		name: string;
		revisions: { id: string; width: number; height: number }[];
	}[];
	const front = partViews.find((v) => v.name === 'Front')!.revisions[0]!;
	const section = partViews.find((v) => v.name === 'Section A–A')!.revisions[0]!;

	// [unit, view, type, x, y]
	const plan: [number, 'Front' | 'Section A–A', string, number, number][] = [
		[1, 'Front', 'Sink mark', 0.2, 0.3],
		[1, 'Front', 'Flash', 0.7, 0.6],
		[2, 'Front', 'Sink mark', 0.45, 0.5],
		[2, 'Section A–A', 'Short shot', 0.3, 0.45],
		[3, 'Front', 'Flash', 0.25, 0.7],
		[4, 'Section A–A', 'Sink mark', 0.6, 0.5],
		[4, 'Front', 'Short shot', 0.8, 0.2]
	];
	for (const [unit, view, type, x, y] of plan) {
		await page.getByRole('tab', { name: new RegExp(`^Unit ${unit},`) }).click();
		await page.getByRole('tab', { name: view, exact: true }).click();
		await page.getByRole('radio', { name: new RegExp(type) }).click();
		const r = await drawingRect(page, view === 'Front' ? front : section);
		await page.mouse.click(r.x + x * r.w, r.y + y * r.h);
	}
	await page.getByRole('tab', { name: /^Unit 5,/ }).click();
	await page.getByRole('button', { name: 'Unit 5 is clean' }).click();
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/);
	await shoot(page, 'bench-pinned');

	// The demo plan wants a photo of every severity A or B defect: Short shot is B.
	await page.getByRole('button', { name: 'Finish sample…' }).click();
	await expect(page.getByText(/Still without one: SS on unit 2, SS on unit 4/)).toBeVisible();
	await expect(page.getByRole('button', { name: 'Finish the sample' })).toBeDisabled();
	await page.getByRole('button', { name: 'Keep inspecting' }).click();
	const photo = { name: 'short-shot.jpg', mimeType: 'image/jpeg', buffer: await cameraPhoto() };
	for (const [unit, view, type, x, y] of plan.filter(([, , type]) => type === 'Short shot')) {
		await page.getByRole('tab', { name: new RegExp(`^Unit ${unit},`) }).click();
		await page.getByRole('tab', { name: view, exact: true }).click();
		const r = await drawingRect(page, view === 'Front' ? front : section);
		await page.mouse.click(r.x + x * r.w, r.y + y * r.h);
		const panel = page.getByRole('complementary', { name: 'Selected pin' });
		await expect(panel).toContainText(`Pin on unit ${unit}`);
		await expect(panel.getByText(/asks for a photo/)).toBeVisible();
		await panel.getByTestId('photo-file').setInputFiles(photo);
		await expect(panel.getByRole('img', { name: `Defect on unit ${unit}` })).toBeVisible();
		await panel.getByRole('button', { name: 'Close the pin panel' }).click();
		expect(type).toBe('Short shot');
	}
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/);

	await page.getByRole('button', { name: 'Finish sample…' }).click();
	const counts = page.getByTestId('close-counts');
	await expect(counts).toContainText('Sink mark');
	await expect(page.getByText('7 defects on 5 units')).toBeVisible();
	await page.getByRole('button', { name: 'Finish the sample' }).click();
	await expect(page).toHaveURL(/\/bench\?closed=/);
	await expect(page.getByRole('status', { name: 'Last sample' })).toContainText('7 defects on 5 units');
	await shoot(page, 'bench-recap');

	const stored = (await (await page.request.get(`/api/v1/samples/${sampleId}`)).json()).sample;
	expect(stored.state).toBe('closed');
	// Each Short shot pin has its photo, served as a thumbnail from the access-checked route.
	const withPhotos = stored.pins.filter((p: { photos: string[] }) => p.photos.length === 1);
	expect(withPhotos).toHaveLength(2);
	const thumb = await page.request.get(`/api/v1/photos/${withPhotos[0].photos[0]}/thumb.webp`);
	expect([thumb.status(), thumb.headers()['content-type']]).toEqual([200, 'image/webp']);
	expect(stored.units.map((u: { status: string }) => u.status)).toEqual([
		'pinned',
		'pinned',
		'pinned',
		'pinned',
		'clean'
	]);
	const types = (await (await page.request.get('/api/v1/defect-types')).json()).defectTypes as {
		id: string;
		name: string;
	}[];
	const nameOf = (id: string) => types.find((t) => t.id === id)!.name;
	const byTypeAndUnit = (list: { type: string; unit: number }[]) => list.map((p) => `${p.unit}:${p.type}`).sort();
	expect(
		byTypeAndUnit(
			stored.pins.map((p: { defectTypeId: string; unitIndex: number }) => ({
				type: nameOf(p.defectTypeId),
				unit: p.unitIndex
			}))
		)
	).toEqual(byTypeAndUnit(plan.map(([unit, , type]) => ({ unit, type }))));
	// Every pin is within 0.5 % of where the pointer was.
	for (const [unit, view, type, x, y] of plan) {
		const revisionId = view === 'Front' ? front.id : section.id;
		const match = stored.pins.find(
			(p: { unitIndex: number; revisionId: string; defectTypeId: string; x: number; y: number }) =>
				p.unitIndex === unit &&
				p.revisionId === revisionId &&
				nameOf(p.defectTypeId) === type &&
				Math.abs(p.x - x) <= 0.005 &&
				Math.abs(p.y - y) <= 0.005
		);
		expect(match, `${unit} ${view} ${type} at ${x}, ${y}`).toBeTruthy();
	}
});

test('pins made without network survive a reload and arrive exactly once', async ({ page, context }) => {
	const sampleId = await startSample(page, 'engineer@example.com');
	const front = (await (await page.request.get(`/api/v1/samples/${sampleId}`)).json()).sample;
	const views = (await (await page.request.get(`/api/v1/parts/${front.partId}/views`)).json()).views;
	const rev = views.find((v: { name: string }) => v.name === 'Front').revisions[0];
	await page.getByRole('radio', { name: /Scratch/ }).click();
	const r = await drawingRect(page, rev);

	await context.setOffline(true);
	for (let i = 0; i < 5; i++) await page.mouse.click(r.x + (0.15 + i * 0.15) * r.w, r.y + 0.5 * r.h);
	await expect(page.getByTestId('sync-state')).toHaveText(/5 waiting/);

	// The page reloads while the API is still unreachable: the five wait in the browser's store.
	await page.route('**/api/v1/**', (route) => route.abort('internetdisconnected'));
	await context.setOffline(false);
	await page.reload();
	await expect(page.getByTestId('sync-state')).toHaveText(/5 waiting/);
	await page.unroute('**/api/v1/**');
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/, { timeout: 15_000 });

	const stored = (await (await page.request.get(`/api/v1/samples/${sampleId}`)).json()).sample;
	expect(stored.pins).toHaveLength(5);
	expect(new Set(stored.pins.map((p: { id: string }) => p.id)).size).toBe(5);
});

test('on a tablet, taps place pins where the finger is, and tapping a pin opens it', async ({ browser }) => {
	const tablet = await browser.newContext({ viewport: { width: 768, height: 1024 }, hasTouch: true, isMobile: true });
	const page = await tablet.newPage();
	const sampleId = await startSample(page, 'admin@example.com');
	const sample = (await (await page.request.get(`/api/v1/samples/${sampleId}`)).json()).sample;
	const views = (await (await page.request.get(`/api/v1/parts/${sample.partId}/views`)).json()).views;
	const rev = views.find((v: { name: string }) => v.name === 'Front').revisions[0];
	await page.getByRole('radio', { name: /Flash/ }).click();
	const r = await drawingRect(page, rev);
	for (const [x, y] of [
		[0.3, 0.4],
		[0.6, 0.5]
	]) {
		await page.touchscreen.tap(r.x + x! * r.w, r.y + y! * r.h);
	}
	await expect(page.getByTestId('sync-state')).toHaveText(/All saved/);
	// Placing never opens the pin panel (it would cover the drawing for the next tap).
	await expect(page.getByRole('complementary', { name: 'Selected pin' })).toHaveCount(0);
	const stored = (await (await page.request.get(`/api/v1/samples/${sampleId}`)).json()).sample.pins as {
		x: number;
		y: number;
	}[];
	expect(stored.map((p) => [Math.round(p.x * 100) / 100, Math.round(p.y * 100) / 100])).toEqual([
		[0.3, 0.4],
		[0.6, 0.5]
	]);
	await page.waitForTimeout(600);
	await page.touchscreen.tap(r.x + 0.3 * r.w, r.y + 0.4 * r.h);
	await expect(page.getByRole('complementary', { name: 'Selected pin' })).toBeVisible();
	await shoot(page, 'bench-tablet');
	await tablet.close();
});
