import { expect, test, type Page } from '@playwright/test';
import { PDFDocument, rgb } from 'pdf-lib';
import sharp from 'sharp';
import { shoot, signIn } from './helpers';

async function drawingPng() {
	// A plain invented outline: a plate with two holes, drawn for this test.
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="800"><rect width="1200" height="800" fill="#fff"/>
		<rect x="100" y="100" width="1000" height="600" rx="40" fill="none" stroke="#222" stroke-width="8"/>
		<circle cx="300" cy="400" r="60" fill="none" stroke="#222" stroke-width="6"/><circle cx="900" cy="400" r="60" fill="none" stroke="#222" stroke-width="6"/></svg>`;
	return sharp(Buffer.from(svg)).png().toBuffer();
}

/** Taps the drawing where a person would: it must be on screen (the page scrolls it into view). */
async function tapCanvas(page: Page, fx: number, fy: number) {
	const canvas = page.getByTestId('drawing-canvas').locator('canvas').first();
	await expect(canvas).toBeInViewport({ ratio: 1 });
	const box = await canvas.boundingBox();
	if (!box) throw new Error('no canvas');
	await page.mouse.click(box.x + fx * box.width, box.y + fy * box.height);
}

test('an engineer creates a part, uploads its drawing, sets a 6 × 4 grid and draws a region', async ({ page }) => {
	const number = `BR-${Date.now().toString(36).toUpperCase()}`;
	await signIn(page, 'engineer@example.com');
	await page.goto('/setup/parts');
	await page.getByRole('button', { name: 'New part' }).click();
	await page.getByLabel('Part number').fill(number);
	await page.getByLabel('Name', { exact: true }).fill('Mounting bracket');
	await page.getByLabel('Material', { exact: true }).fill('PA66 GF30');
	await page.getByRole('button', { name: 'Create the part' }).click();
	await expect(page.getByRole('heading', { name: `${number} · Mounting bracket` })).toBeVisible();

	await page.getByLabel('Add a view').fill('Front');
	await page.getByRole('button', { name: 'Add view' }).click();
	await expect(page.getByText('View added.')).toBeVisible();

	await page
		.getByLabel('New drawing for Front')
		.setInputFiles({ name: 'bracket-front.png', mimeType: 'image/png', buffer: await drawingPng() });
	await page.getByRole('button', { name: 'Upload' }).click();
	await expect(page.getByText('Revision A')).toBeVisible();
	await shoot(page, 'engineer-part');

	await page.getByRole('link', { name: 'Zones and regions' }).click();
	await page.getByLabel('Columns (1, 2, 3 …)').fill('6');
	await page.getByLabel('Rows (A, B, C …)').fill('4');
	await page.getByRole('button', { name: 'Save the grid' }).click();
	await expect(page.getByText('Grid saved.')).toBeVisible();

	await expect(page.getByTestId('drawing-canvas')).toHaveAttribute('data-ready', 'yes');
	await page.getByRole('button', { name: 'Draw a new region' }).click();
	for (const [x, y] of [
		[0.15, 0.2],
		[0.45, 0.2],
		[0.45, 0.8],
		[0.15, 0.8]
	]) {
		await tapCanvas(page, x!, y!);
	}
	await expect(page.getByText('4 corners so far.')).toBeVisible();
	await page.getByLabel('Name of the region').fill('Left hole');
	await page.getByRole('button', { name: 'Close the outline and save' }).click();
	// 0.30 × 0.60 of the drawing: 18 % of its area (within a pixel or two of the taps).
	await expect(page.getByRole('button', { name: /Left hole · 1[78]\.\d % of the drawing/ })).toBeVisible();
	await shoot(page, 'engineer-zones');

	// The server derived everything from normalised coordinates: check through the API.
	const revisionId = page.url().split('/').pop()!;
	const rev = (await (await page.request.get(`/api/v1/revisions/${revisionId}`)).json()).revision;
	expect([rev.gridColumns, rev.gridRows]).toEqual([6, 4]);
	expect(rev.regions).toHaveLength(1);
	expect(rev.regions[0].area).toBeGreaterThan(0.16);
	expect(rev.regions[0].area).toBeLessThan(0.2);

	// A defect type that applies to this part only, and a two-cavity die that makes it.
	const code = `K${Date.now().toString(36).slice(-4).toUpperCase()}`;
	await page.goto('/setup/defects');
	await page.getByRole('link', { name: 'New defect type' }).click();
	await page.getByLabel('Code').fill(code);
	await page.getByLabel('Name', { exact: true }).fill('Knit line crack');
	await page.getByRole('radio', { name: 'Rust' }).check();
	await page.getByRole('radio', { name: 'Star' }).check();
	await page.getByRole('radio', { name: /^B · serious/ }).check();
	await page.getByRole('checkbox', { name: 'All parts' }).uncheck();
	await page.getByRole('checkbox', { name: new RegExp(number) }).check();
	await page.getByRole('button', { name: 'Add to the catalogue' }).click();
	await expect(page.getByText('Knit line crack').first()).toBeVisible();
	await shoot(page, 'engineer-defects');

	await page.goto('/setup/tools');
	await page.getByRole('link', { name: 'New tool' }).click();
	await page.getByLabel('Tool number').fill(`D-${code}`);
	await page.getByLabel('Name', { exact: true }).fill('Bracket die');
	await page.getByRole('radio', { name: /^Die/ }).check();
	await page.getByLabel('Cavities', { exact: true }).fill('2');
	await page.getByRole('checkbox', { name: new RegExp(number) }).check();
	await page.getByRole('button', { name: 'Add the tool' }).click();
	await expect(page.getByText('Bracket die').first()).toBeVisible();
	await shoot(page, 'engineer-tools');

	const tools = (await (await page.request.get('/api/v1/tools')).json()).tools as {
		code: string;
		cavityCount: number;
		parts: string[];
	}[];
	expect(tools.find((t) => t.code === `D-${code}`)).toMatchObject({ cavityCount: 2, parts: [number] });
	const types = (await (await page.request.get('/api/v1/defect-types')).json()).defectTypes as {
		code: string;
		allParts: boolean;
		partNumbers: string[];
		severity: string;
	}[];
	expect(types.find((t) => t.code === code)).toMatchObject({ allParts: false, partNumbers: [number], severity: 'B' });
});

test('readers see Setup but cannot change it', async ({ page }) => {
	await signIn(page, 'viewer@example.com');
	await page.goto('/setup/parts');
	await expect(page.getByRole('button', { name: 'New part' })).toHaveCount(0);
	await page.getByRole('link', { name: 'FW-118' }).click();
	await expect(page.getByRole('button', { name: 'Save the plan' })).toHaveCount(0);
	await expect(page.getByText('5 units per sample')).toBeVisible();
	await shoot(page, 'viewer-part');
});

test('a PDF drawing is drawn in the browser, page by choice, and stored as an image', async ({ page }) => {
	// Two landscape A4 pages (842 × 595 pt); the second has a thick frame, made for this test.
	const pdf = await PDFDocument.create();
	pdf.addPage([842, 595]);
	const second = pdf.addPage([842, 595]);
	second.drawRectangle({ x: 60, y: 60, width: 722, height: 475, borderWidth: 12, borderColor: rgb(0.1, 0.1, 0.1) });
	const bytes = Buffer.from(await pdf.save());

	await signIn(page, 'engineer@example.com');
	await page.goto('/setup/parts');
	await page.getByRole('link', { name: 'FW-118' }).click();
	await page.getByLabel('Add a view').fill(`From PDF ${Date.now().toString(36)}`);
	await page.getByRole('button', { name: 'Add view' }).click();
	await expect(page.getByText('View added.')).toBeVisible();
	const upload = page.getByRole('form', { name: /Upload a drawing for From PDF/ });
	await upload
		.getByLabel(/New drawing for/)
		.setInputFiles({ name: 'drawing.pdf', mimeType: 'application/pdf', buffer: bytes });
	await upload.getByLabel('Page of the PDF (1 to 2)').fill('2');
	await upload.getByRole('button', { name: 'Upload' }).click();
	const article = page.getByRole('article', { name: /View From PDF/ });
	await expect(article.getByText('Revision A')).toBeVisible();

	const views = (
		await (await page.request.get(page.url().replace('/setup/parts/', '/api/v1/parts/') + '/views')).json()
	).views as {
		name: string;
		revisions: { originalType: string; originalWidth: number; originalHeight: number; width: number; height: number }[];
	}[];
	const rev = views.find((v) => v.name.startsWith('From PDF'))!.revisions[0]!;
	// Rendered at 3000 px on the long side, then shown at 2400: the page's 842 : 595 shape survives.
	expect(rev).toMatchObject({ originalType: 'image/png', originalWidth: 3000, width: 2400 });
	expect(rev.originalHeight).toBeCloseTo((3000 * 595) / 842, -1);
});
