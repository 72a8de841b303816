import { expect, test, type APIRequestContext } from '@playwright/test';
import { signIn, signUp, unique } from './helpers';

/** Every Setup write in the API, with a body that would be valid for an engineer. */
async function setupWrites(request: APIRequestContext) {
	const parts = (await (await request.get('/api/v1/parts')).json()).parts as { id: string }[];
	const partId = parts[0]!.id;
	const views = (await (await request.get(`/api/v1/parts/${partId}/views`)).json()).views as {
		id: string;
		revisions: { id: string }[];
	}[];
	const viewId = views[0]!.id;
	const revisionId = views[0]!.revisions[0]!.id;
	const regionId = (
		(await (await request.get(`/api/v1/revisions/${revisionId}/regions`)).json()).regions as { id: string }[]
	)[0]!.id;
	const types = (await (await request.get('/api/v1/defect-types')).json()).defectTypes as { id: string }[];
	const tools = (await (await request.get('/api/v1/tools')).json()).tools as { id: string }[];
	const square = [
		[0.1, 0.1],
		[0.2, 0.1],
		[0.2, 0.2]
	];
	return [
		['POST', '/api/v1/parts', { number: 'X-1', name: 'X' }],
		['PATCH', `/api/v1/parts/${partId}`, { name: 'Renamed' }],
		['PUT', `/api/v1/parts/${partId}/plan`, { basis: 'units', sampleSize: 3, frequency: 'lot' }],
		['POST', `/api/v1/parts/${partId}/views`, { name: 'Top' }],
		['POST', `/api/v1/views/${viewId}/revisions`, null],
		['PATCH', `/api/v1/revisions/${revisionId}`, { columns: 2, rows: 2 }],
		['POST', `/api/v1/revisions/${revisionId}/regions`, { name: 'New', points: square }],
		['PATCH', `/api/v1/regions/${regionId}`, { name: 'Renamed' }],
		['DELETE', `/api/v1/regions/${regionId}`, undefined],
		['POST', '/api/v1/defect-types', { code: 'ZZ', name: 'Z', colour: 'sky', shape: 'dot', severity: 'D' }],
		['PATCH', `/api/v1/defect-types/${types[0]!.id}`, { name: 'Renamed' }],
		['PUT', '/api/v1/defect-types/order', { ids: types.map((t) => t.id) }],
		['PUT', '/api/v1/demerit-weights', { a: 1, b: 1, c: 1, d: 1 }],
		['POST', '/api/v1/tools', { code: 'T-9', name: 'T', kind: 'die', cavityCount: 1 }],
		['PATCH', `/api/v1/tools/${tools[0]!.id}`, { name: 'Renamed' }]
	] as const;
}

function send(request: APIRequestContext, method: string, url: string, body: unknown) {
	if (body === null)
		return request.fetch(url, { method, data: Buffer.from('not an image'), headers: { 'content-type': 'image/png' } });
	return request.fetch(url, { method, ...(body === undefined ? {} : { data: body }) });
}

for (const who of ['inspector@example.com', 'viewer@example.com', 'toolmaker@example.com']) {
	test(`${who.split('@')[0]} gets 403 on every Setup write, and reads Setup`, async ({ page }) => {
		await signIn(page, who);
		const writes = await setupWrites(page.request);
		for (const [method, url, body] of writes) {
			const res = await send(page.request, method, url, body);
			expect(res.status(), `${method} ${url}`).toBe(403);
			expect((await res.json()).error.code).toBe('forbidden');
		}
		expect((await page.request.get('/api/v1/parts')).status()).toBe(200);
	});
}

test("another organisation's part, drawing, type and tool are not found (404)", async ({ page, browser }) => {
	await signIn(page, 'engineer@example.com');
	const writes = await setupWrites(page.request);

	const ctx = await browser.newContext();
	const other = await ctx.newPage();
	await signUp(other, 'Ada Stranger', unique('stranger'));
	await other.getByLabel('Plant or company name').fill('Stranger Stamping');
	await other.getByRole('button', { name: 'Set up the organisation' }).click();
	await expect(other).toHaveURL(/\/team$/);

	for (const [method, url, body] of writes) {
		// Creating in one's own organisation is allowed; everything naming a demo row must be 404.
		if (
			url === '/api/v1/parts' ||
			url === '/api/v1/defect-types' ||
			url === '/api/v1/tools' ||
			url === '/api/v1/demerit-weights'
		)
			continue;
		const res = await send(other.request, method, url, body);
		expect(res.status(), `${method} ${url}`).toBe(url.endsWith('/order') ? 422 : 404);
	}
	const partUrl = writes[1][1];
	expect((await other.request.get(partUrl)).status()).toBe(404);
	expect((await other.request.get(`${partUrl}/changes`)).status()).toBe(404);
	await ctx.close();
});
