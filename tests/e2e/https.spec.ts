/**
 * Behind HTTPS: the app as a TLS-terminating proxy would run it (ORIGIN https://…, plain HTTP on
 * loopback behind the proxy). The session cookie must then be Secure (and __Secure- prefixed),
 * HttpOnly and SameSite=Lax, and pages must tell browsers to keep to HTTPS (HSTS).
 */
import { expect, test } from '@playwright/test';
import { anotherApp } from './another-app';
import { DEMO_PASSWORD } from './helpers';

const ORIGIN = 'https://stipple.plant.example';

test('behind HTTPS the session cookie is Secure, HttpOnly and SameSite=Lax, and HSTS is sent', async ({
	playwright
}) => {
	test.setTimeout(60_000);
	const app = await anotherApp({ ORIGIN });
	const request = await playwright.request.newContext({ baseURL: app.url });
	try {
		const res = await request.post('/sign-in', {
			form: { email: 'viewer@example.com', password: DEMO_PASSWORD },
			headers: { origin: ORIGIN, accept: 'text/html' },
			maxRedirects: 0
		});
		expect(res.status()).toBe(303);
		const cookies = res
			.headersArray()
			.filter((h) => h.name.toLowerCase() === 'set-cookie')
			.map((h) => h.value);
		const session = cookies.find((c) => c.startsWith('__Secure-better-auth.session_token='));
		expect(session, cookies.join('\n')).toBeTruthy();
		const flags = session!.split(';').map((f) => f.trim().toLowerCase());
		expect(flags).toContain('secure');
		expect(flags).toContain('httponly');
		expect(flags).toContain('samesite=lax');
		// No session cookie leaves without Secure.
		for (const c of cookies.filter((c) => c.includes('better-auth')))
			expect(
				c
					.toLowerCase()
					.split(';')
					.map((f) => f.trim()),
				c
			).toContain('secure');

		expect(res.headers()['strict-transport-security']).toMatch(/max-age=\d{7,}/);
		const page = await request.get('/sign-in');
		expect(page.headers()['strict-transport-security']).toMatch(/max-age=\d{7,}/);
	} finally {
		await request.dispose();
		await app.stop();
	}
});
