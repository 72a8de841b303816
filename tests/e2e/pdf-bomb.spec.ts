/**
 * PDFs are drawn in the browser (src/lib/components/setup/pdf.ts: at most 200 pages, the chosen page
 * drawn 3000 px on its long side); the server only ever sees the PNG. Hostile PDFs, through Setup's
 * drawing upload: a page-count bomb is refused on the page and creates no revision, a page tree that
 * lies about its count opens as what it holds, and a page kilometres wide comes out 3000 px.
 */
import { expect, test, type Page } from '@playwright/test';
import sharp from 'sharp';
import { countLie, hugePage, pageBomb } from '../fixtures/pdfs';
import { signIn } from './helpers';

interface Revision {
	id: string;
	label: string;
	originalType: string;
	originalWidth: number;
	originalHeight: number;
	width: number;
	height: number;
}

let partId = '';

/** Every revision of the part, by view name, from the JSON API. */
async function revisions(page: Page) {
	const res = await page.request.get(`/api/v1/parts/${partId}/views`);
	expect(res.status()).toBe(200);
	const { views } = (await res.json()) as { views: { name: string; revisions: Revision[] }[] };
	return Object.fromEntries(views.map((v) => [v.name, v.revisions]));
}

/** A new view of the part (through the API), then the part's Setup page with its upload form. */
async function uploadFormFor(page: Page, name: string) {
	const res = await page.request.post(`/api/v1/parts/${partId}/views`, { data: { name } });
	expect(res.status()).toBe(201);
	await page.goto(`/setup/parts/${partId}`);
	return page.getByRole('form', { name: `Upload a drawing for ${name}` });
}

const pdf = (buffer: Buffer) => ({ name: 'drawing.pdf', mimeType: 'application/pdf', buffer });

test.beforeEach(async ({ page }) => {
	await signIn(page, 'engineer@example.com');
	if (partId) return;
	const number = `PDF-${Date.now().toString(36).toUpperCase()}`;
	const res = await page.request.post('/api/v1/parts', { data: { number, name: 'Hostile PDFs' } });
	expect(res.status()).toBe(201);
	partId = ((await res.json()) as { part: { id: string } }).part.id;
});

test('a PDF whose page tree holds a million pages is refused on the page, and no revision is made', async ({
	page
}) => {
	const before = await revisions(page);
	const form = await uploadFormFor(page, 'Bomb');
	const sent: string[] = [];
	page.on('request', (r) => {
		if (r.url().includes('/revisions')) sent.push(`${r.method()} ${r.url()}`);
	});
	await form.getByLabel('New drawing for Bomb').setInputFiles(pdf(pageBomb()));
	// pdf.js follows the counts (the last page exists), so the page limit is what stops it.
	await expect(form.getByRole('alert')).toHaveText(
		'This PDF has 1,000,000 pages; Stipple takes drawings of up to 200 pages.'
	);
	await expect(form.getByRole('button', { name: 'Upload' })).toBeDisabled();
	await expect(form.getByLabel(/Page of the PDF/)).toHaveCount(0);
	expect(await revisions(page)).toEqual({ ...before, Bomb: [] });
	expect(sent).toEqual([]);
});

test('a page tree that claims /Count 1000000 over one page opens as that one page', async ({ page }) => {
	const form = await uploadFormFor(page, 'Count lie');
	await form.getByLabel('New drawing for Count lie').setInputFiles(pdf(countLie()));
	// pdf.js finds no last page where the count says, walks the tree, and counts one: no page field, no refusal.
	// (The button is enabled once the PDF has been read.)
	await expect(form.getByRole('button', { name: 'Upload' })).toBeEnabled();
	await expect(form.getByLabel(/Page of the PDF/)).toHaveCount(0);
	await expect(form.getByRole('alert')).toHaveCount(0);
	await form.getByRole('button', { name: 'Upload' }).click();
	await expect(page.getByRole('article', { name: /View Count lie/ }).getByText('Revision A')).toBeVisible();
	// A4 portrait, 595 × 842 pt, drawn 3000 px tall.
	expect((await revisions(page))['Count lie']).toEqual([
		expect.objectContaining({
			originalType: 'image/png',
			originalWidth: Math.round((3000 * 595) / 842),
			originalHeight: 3000
		})
	]);
});

test('a page of 14,400,000 × 14,400,000 units is drawn 3000 px square, and uploads', async ({ page }) => {
	const form = await uploadFormFor(page, 'Huge page');
	await form.getByLabel('New drawing for Huge page').setInputFiles(pdf(hugePage()));
	await form.getByRole('button', { name: 'Upload' }).click();
	await expect(page.getByRole('article', { name: /View Huge page/ }).getByText('Revision A')).toBeVisible();
	const [rev] = (await revisions(page))['Huge page']!;
	expect(rev).toMatchObject({ originalType: 'image/png', originalWidth: 3000, originalHeight: 3000, width: 2400 });
	// Drawn, not blank: the page is black in its middle four fifths and white around.
	const thumb = await page.request.get(`/api/v1/revisions/${rev!.id}/thumb.webp`);
	expect(thumb.headers()['content-type']).toBe('image/webp');
	const { data, info } = await sharp(await thumb.body())
		.greyscale()
		.raw()
		.toBuffer({ resolveWithObject: true });
	expect([info.width, info.height]).toEqual([320, 320]);
	const at = (x: number, y: number) => data[y * info.width + x]!;
	expect(at(160, 160)).toBeLessThan(40);
	for (const corner of [at(4, 4), at(315, 4), at(4, 315), at(315, 315)]) expect(corner).toBeGreaterThan(230);
});
