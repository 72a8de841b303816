import { expect, test } from '@playwright/test';
import { shoot, signIn } from './helpers';

const PAGES = ['/', '/bench', '/trends', '/hotspots', '/repairs', '/signals', '/setup', '/team', '/mailbox'];

test('every main screen renders for the demo admin, light and dark, and is written for review', async ({ page }) => {
	await page.goto('/sign-in');
	await shoot(page, 'sign-in');
	await signIn(page, 'admin@example.com');
	for (const p of PAGES) {
		const res = await page.goto(p);
		expect(res?.status(), p).toBe(200);
		await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
		await shoot(page, `admin${p === '/' ? '-home' : p.replace('/', '-')}`);
	}
	await page.emulateMedia({ colorScheme: 'dark' });
	await page.goto('/team');
	const bg = await page.evaluate(() => getComputedStyle(document.documentElement).backgroundColor);
	expect(bg).toBe('rgb(21, 25, 27)');
	await shoot(page, 'admin-team-dark');
});

test('Setup shows the demo part with its two drawings, served through the access-checked route', async ({
	page,
	browser
}) => {
	await signIn(page, 'inspector@example.com');
	await page.goto('/setup');
	const drawings = page.getByRole('list', { name: 'Drawings of FW-118' }).getByRole('img');
	await expect(drawings).toHaveCount(2);
	for (const img of await drawings.all()) {
		await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth)).toBe(320);
	}
	const src = await drawings.first().getAttribute('src');
	// A stranger gets no drawing.
	const anon = await browser.newContext();
	expect((await anon.request.get(src!)).status()).toBe(401);
	await anon.close();
	await shoot(page, 'inspector-setup');
});

test("an unknown page and a forbidden page answer with Stipple's own error screen", async ({ page }) => {
	await signIn(page, 'viewer@example.com');
	expect((await page.goto('/no-such-page'))?.status()).toBe(404);
	await expect(page.getByRole('heading', { name: 'Nothing here' })).toBeVisible();
	expect((await page.goto('/signals'))?.status()).toBe(403);
	await expect(page.getByRole('heading', { name: 'Not for your role' })).toBeVisible();
	await shoot(page, 'error-403');
});

test('fits a 768 px tablet in portrait without sideways scrolling', async ({ browser }) => {
	const tablet = await browser.newContext({ viewport: { width: 768, height: 1024 }, hasTouch: true });
	const page = await tablet.newPage();
	await signIn(page, 'admin@example.com');
	await page.goto('/setup/parts');
	await page.getByRole('link', { name: 'FW-118' }).click();
	const partPage = page.url();
	await page.getByRole('link', { name: 'Zones and regions' }).first().click();
	await expect(page.getByTestId('drawing-canvas')).toHaveAttribute('data-ready', 'yes');
	const drawingPage = page.url();
	for (const p of ['/', '/team', '/bench', '/setup', '/setup/parts', partPage, drawingPage]) {
		await page.goto(p);
		const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
		expect(overflow, p).toBeLessThanOrEqual(0);
	}
	await shoot(page, 'tablet-bench');
	await tablet.close();
});

test('is usable from the keyboard: skip link first, then the screens', async ({ page }) => {
	await signIn(page, 'engineer@example.com');
	await page.goto('/');
	await page.keyboard.press('Tab');
	await expect(page.getByRole('link', { name: 'Skip to content' })).toBeFocused();
	await page.keyboard.press('Enter');
	await expect(page).toHaveURL(/#main$/);
});

test('each role sees its own screens', async ({ browser }) => {
	const expected: Record<string, string[]> = {
		'engineer@example.com': ['Bench', 'Trends', 'Hot spots', 'Repairs', 'Reports', 'Signals', 'Setup'],
		'inspector@example.com': ['Bench', 'Setup'],
		'toolmaker@example.com': ['Trends', 'Hot spots', 'Repairs', 'Reports', 'Setup'],
		'viewer@example.com': ['Trends', 'Hot spots', 'Repairs', 'Reports', 'Setup']
	};
	for (const [email, screens] of Object.entries(expected)) {
		const ctx = await browser.newContext();
		const page = await ctx.newPage();
		await signIn(page, email);
		const links = page.getByRole('navigation', { name: 'Screens' }).getByRole('listitem');
		await expect(links).toHaveText(screens);
		expect((await page.goto('/team'))?.status()).toBe(403);
		await ctx.close();
	}
});

test('built pages load nothing from outside this server', async ({ page }) => {
	const outside: string[] = [];
	page.on('request', (req) => {
		if (!req.url().startsWith(process.env.STIPPLE_E2E_URL!) && !req.url().startsWith('data:')) outside.push(req.url());
	});
	await signIn(page, 'viewer@example.com');
	await page.goto('/trends');
	await page.goto('/sign-in');
	expect(outside).toEqual([]);
	const fonts = await page.evaluate(() =>
		[...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family)
	);
	expect(fonts.join(',')).toContain('Atkinson Hyperlegible Next');
});

test('the look can be set to dark from the user menu and stays so', async ({ page }) => {
	await signIn(page, 'toolmaker@example.com');
	await page.getByRole('button', { name: /Rui Amado/ }).click();
	await page.getByRole('button', { name: 'Dark' }).click();
	await expect(page.locator('html')).toHaveAttribute('data-theme', 'dark');
	await page.reload();
	await expect(page.locator('html')).toHaveAttribute('data-theme', 'dark');
	await page.keyboard.press('Escape');
	await shoot(page, 'toolmaker-home-dark');
	await page.getByRole('button', { name: /Rui Amado/ }).click();
	await page.getByRole('button', { name: 'Auto' }).click();
	await expect(page.locator('html')).toHaveAttribute('data-theme', 'system');
});
