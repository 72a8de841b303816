import { expect, test, type APIRequestContext, type APIResponse } from '@playwright/test';
import { signIn, signUp } from './helpers';

async function expectErrorShape(res: APIResponse, status: number | number[]) {
	const allowed = Array.isArray(status) ? status : [status];
	expect(allowed, `${res.url()} answered ${res.status()}`).toContain(res.status());
	const body = await res.json();
	expect(typeof body.error.code).toBe('string');
	expect(typeof body.error.message).toBe('string');
	expect(body.error.message.length).toBeGreaterThan(0);
	return body.error as { code: string; message: string; issues?: { path: string; message: string }[] };
}

type Call = { method: 'POST' | 'PUT' | 'PATCH'; url: string };
const BODY_ENDPOINTS: Call[] = [
	{ method: 'POST', url: '/api/v1/organizations' },
	{ method: 'PUT', url: '/api/v1/session/organization' },
	{ method: 'POST', url: '/api/v1/invitations' },
	{ method: 'PATCH', url: '/api/v1/members/some-member-id' }
];

const BAD_BODIES: { label: string; data: string; type?: string; status: number[] }[] = [
	{ label: 'malformed JSON', data: '{"name": ', status: [400] },
	{ label: 'not JSON at all', data: 'name=Plant', type: 'application/x-www-form-urlencoded', status: [415] },
	{ label: 'empty object', data: '{}', status: [422] },
	{ label: 'array', data: '[1,2,3]', status: [422] },
	{ label: 'null', data: 'null', status: [422] },
	{ label: 'wrong types', data: '{"name":42,"email":true,"role":["admin"],"organizationId":{}}', status: [422] },
	{
		label: 'over-long strings',
		data: JSON.stringify({
			name: 'x'.repeat(5000),
			email: `${'y'.repeat(300)}@example.com`,
			role: 'z'.repeat(1000),
			organizationId: 'q'.repeat(900)
		}),
		status: [422]
	}
];

function send(request: APIRequestContext, call: Call, data: string, type = 'application/json') {
	// A Buffer goes out byte for byte; a string would be JSON-encoded first. The Origin header is
	// what a same-site client sends; without it SvelteKit refuses form-encoded posts as cross-site.
	return request.fetch(call.url, {
		method: call.method,
		data: Buffer.from(data),
		headers: { 'content-type': type, origin: process.env.STIPPLE_E2E_URL! }
	});
}

test.describe('JSON API', () => {
	test('answers every bad body on every endpoint with a 4xx in the error shape', async ({ page }) => {
		await signIn(page, 'admin@example.com');
		for (const call of BODY_ENDPOINTS) {
			for (const bad of BAD_BODIES) {
				const res = await send(page.request, call, bad.data, bad.type);
				await test.step(`${call.method} ${call.url}: ${bad.label}`, async () => {
					const err = await expectErrorShape(
						res,
						call.url.includes('/members/') && bad.status[0] === 422 ? [404, 422] : bad.status
					);
					if (res.status() === 422) expect(err.issues?.length).toBeGreaterThan(0);
				});
			}
		}
	});

	test('names the fields that are wrong', async ({ page }) => {
		await signIn(page, 'admin@example.com');
		const res = await page.request.post('/api/v1/invitations', { data: { email: 'not-an-email', role: 'owner' } });
		const err = await expectErrorShape(res, 422);
		expect(err.issues?.map((i) => i.path).sort()).toEqual(['email', 'role']);
	});

	test('answers strangers 401, wrong roles 403, unknown ids 404, unknown routes 404, wrong methods 405', async ({
		page,
		request
	}) => {
		expect((await expectErrorShape(await request.get('/api/v1/me'), 401)).code).toBe('unauthenticated');
		await expectErrorShape(await request.post('/api/v1/invitations', { data: {} }), 401);
		await expectErrorShape(await request.get('/api/v1/no-such-thing'), 404);

		await signIn(page, 'viewer@example.com');
		await expectErrorShape(await page.request.get('/api/v1/members'), 403);
		await expectErrorShape(
			await page.request.post('/api/v1/invitations', { data: { email: 'a@example.com', role: 'viewer' } }),
			403
		);
		await expectErrorShape(await page.request.delete('/api/v1/me'), 405);
		const me = await (await page.request.get('/api/v1/me')).json();
		expect(me.role).toBe('viewer');
	});

	test('an admin cannot touch members or invitations of another organisation (404)', async ({ page, browser }) => {
		// The demo admin's own member id, seen from inside the demo organisation.
		await signIn(page, 'admin@example.com');
		const demoMembers = (await (await page.request.get('/api/v1/members')).json()).members as { id: string }[];
		const demoMember = demoMembers[0]!.id;

		const ctx = await browser.newContext();
		const other = await ctx.newPage();
		const email = `outsider-${Date.now()}@example.com`;
		await signUp(other, 'Out Sider', email);
		const created = await other.request.post('/api/v1/organizations', { data: { name: 'Elsewhere Works' } });
		expect(created.status()).toBe(201);

		await expectErrorShape(
			await other.request.patch(`/api/v1/members/${demoMember}`, { data: { role: 'viewer' } }),
			404
		);
		await expectErrorShape(await other.request.delete(`/api/v1/members/${demoMember}`), 404);
		await expectErrorShape(await other.request.delete('/api/v1/invitations/not-a-real-invitation'), 404);
		const demoOrg = (await (await page.request.get('/api/v1/me')).json()).organization.id as string;
		await expectErrorShape(
			await other.request.put('/api/v1/session/organization', { data: { organizationId: demoOrg } }),
			404
		);
		await ctx.close();

		// And the demo organisation is as it was.
		const after = (await (await page.request.get('/api/v1/members')).json()).members as { id: string }[];
		expect(after).toHaveLength(demoMembers.length);
	});

	test('the last admin cannot be demoted through the API', async ({ page }) => {
		await signIn(page, 'admin@example.com');
		const me = (await (await page.request.get('/api/v1/me')).json()).user.id as string;
		const members = (await (await page.request.get('/api/v1/members')).json()).members as {
			id: string;
			userId: string;
		}[];
		const mine = members.find((m) => m.userId === me)!;
		const err = await expectErrorShape(
			await page.request.patch(`/api/v1/members/${mine.id}`, { data: { role: 'engineer' } }),
			409
		);
		expect(err.code).toBe('last_admin');
	});
});

test.describe('page forms', () => {
	const FORMS: { url: string; fields: Record<string, string> }[] = [
		{ url: '/sign-in', fields: { email: 'x'.repeat(5000), password: '' } },
		{ url: '/sign-up', fields: { name: '', email: 'not-an-email', password: 'short' } },
		{ url: '/forgot', fields: { email: 'y'.repeat(400) } },
		{ url: '/reset', fields: { token: '', password: 'a', confirm: 'b' } }
	];

	test('answer bad input with 400 and the form again, never a server error', async ({ request }) => {
		for (const form of FORMS) {
			const res = await request.post(form.url, {
				form: form.fields,
				// As a browser without JavaScript posts it: it wants the page back, not the JSON of use:enhance.
				headers: { origin: process.env.STIPPLE_E2E_URL!, accept: 'text/html' },
				maxRedirects: 0
			});
			expect(res.status(), form.url).toBe(400);
			expect(await res.text()).toContain('Please check the fields marked below.');
		}
	});
});
