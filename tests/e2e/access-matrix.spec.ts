/**
 * The access matrix, for a plant's IT audit: every route on disk against a table of what an
 * anonymous caller, each of Fernwick's five roles and a member of another organisation get
 * (access-table.ts), plus CSRF, the session cookie's flags, security headers, the sign-in brake
 * and a scan of every page's HTML and data for secrets. HTTP only (request contexts), no browser.
 */
import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { expect, test, type APIRequestContext, type APIResponse } from '@playwright/test';
import { v7 as uuidv7 } from 'uuid';
import { DEMO_PASSWORD, unique } from './helpers';
import {
	ACTORS,
	RANDOM,
	AUTH_TABLE,
	TABLE,
	describe as describeOutcome,
	matches,
	parseExpect,
	routesOnDisk,
	tableKey,
	urlOf,
	type Actor,
	type Body,
	type Ids,
	type Row
} from './access-table';

const ROOT = path.resolve(import.meta.dirname, '../..');
const ROUTES = path.join(ROOT, 'src/routes');
const OTHER_PASSWORD = 'another organisation password';

let base: string;
const ctx = {} as Record<Actor, APIRequestContext>;
const ids: Ids = {};
/** Set-Cookie headers of the admin's sign-in, for the flag checks. */
let signInCookies: string[] = [];
/** Values that must never reach a page: session tokens, the auth secret, a station key and its hash. */
const secrets: { label: string; value: string }[] = [];

function form(email: string, password: string) {
	return { email, password };
}

/** Signs in through the sign-in form, as a browser without JavaScript does (303, not followed). */
async function signIn(request: APIRequestContext, email: string, password: string) {
	const res = await request.post('/sign-in', {
		form: form(email, password),
		headers: { origin: base, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(res.status(), `signing in as ${email}`).toBe(303);
	return res;
}

async function getJson<T>(request: APIRequestContext, url: string): Promise<T> {
	const res = await request.get(url);
	expect(res.status(), `${url}: ${await res.text()}`).toBe(200);
	return (await res.json()) as T;
}

/** The demo's ids the routes need, looked up through the API as Fernwick's admin. */
async function lookUpDemo(admin: APIRequestContext) {
	const me = await getJson<{ organization: { id: string } }>(admin, '/api/v1/me');
	ids.orgId = me.organization.id;
	const { parts } = await getJson<{ parts: { id: string; number: string }[] }>(admin, '/api/v1/parts?q=FW-118');
	ids.partId = parts.find((p) => p.number === 'FW-118')!.id;
	const { views } = await getJson<{ views: { id: string; name: string; revisions: { id: string }[] }[] }>(
		admin,
		`/api/v1/parts/${ids.partId}/views`
	);
	const front = views.find((v) => v.name === 'Front')!;
	ids.viewId = front.id;
	ids.revisionId = front.revisions[0]!.id;
	const { regions } = await getJson<{ regions: { id: string }[] }>(
		admin,
		`/api/v1/revisions/${ids.revisionId}/regions`
	);
	ids.regionId = regions[0]!.id;
	const { defectTypes } = await getJson<{ defectTypes: { id: string }[] }>(admin, '/api/v1/defect-types');
	ids.defectTypeId = defectTypes[0]!.id;
	ids.defectTypeIds = defectTypes.map((t) => t.id).join(',');
	const { tools } = await getJson<{ tools: { id: string; code: string }[] }>(admin, '/api/v1/tools');
	ids.toolId = tools.find((t) => t.code === 'MQ-4')!.id;

	// A closed Bench sample with pins, from the chart's points.
	const chart = await getJson<{ points: { sample: string; source: string }[] }>(
		admin,
		`/api/v1/parts/${ids.partId}/chart`
	);
	const bench = chart.points.filter((p) => p.source === 'bench').reverse();
	for (const p of bench) {
		const { sample } = await getJson<{
			sample: { id: string; state: string; pins: { id: string; photos?: { id: string }[] }[] };
		}>(admin, `/api/v1/samples/${p.sample}`);
		if (sample.state !== 'closed' || !sample.pins.length) continue;
		ids.sampleId = sample.id;
		ids.pinId = sample.pins[0]!.id;
		ids.photoId = sample.pins.flatMap((pin) => pin.photos ?? [])[0]?.id ?? randomUUID();
		break;
	}
	expect(ids.sampleId, 'a closed demo sample with pins').toBeTruthy();

	const { signals } = await getJson<{ signals: { id: string }[] }>(admin, '/api/v1/signals');
	ids.signalId = signals[0]!.id;
	const { repairs } = await getJson<{ repairs: { id: string }[] }>(admin, '/api/v1/repairs');
	ids.repairId = repairs[0]!.id;
	const { photos } = await getJson<{ photos: { id: string }[] }>(admin, `/api/v1/repairs/${ids.repairId}/photos`);
	ids.repairPhotoId = photos[0]?.id ?? randomUUID();
	const { limitSets } = await getJson<{ limitSets: { id: string; state: string }[] }>(
		admin,
		`/api/v1/parts/${ids.partId}/limit-sets`
	);
	// Frozen, so that POST …/freeze (run for real by engineers) changes nothing.
	ids.limitSetId = limitSets.find((s) => s.state === 'frozen')!.id;
	const { members } = await getJson<{ members: { id: string; role: string }[] }>(admin, '/api/v1/members');
	ids.memberId = members.find((m) => m.role === 'viewer')!.id;
	ids.index = '1';
	ids.file = 'display.webp';
	ids.newPinId = uuidv7();
}

/** The BETTER_AUTH_SECRET the e2e app runs with, read from the fixture that starts it (label "e2e"). */
function authSecretOfTheRun() {
	const fixture = fs.readFileSync(path.join(ROOT, 'tests/fixtures/app-server.ts'), 'utf8');
	const m = /BETTER_AUTH_SECRET: `\$\{label\}([^`]+)`/.exec(fixture);
	if (!m) throw new Error('The fixture no longer sets BETTER_AUTH_SECRET as `${label}…`; update this spec.');
	return `e2e${m[1]}`;
}

async function sessionToken(request: APIRequestContext) {
	const { cookies } = await request.storageState();
	const c = cookies.find((k) => k.name.endsWith('session_token'));
	return c ? decodeURIComponent(c.value).split('.')[0]! : null;
}

test.beforeAll(async ({ playwright }) => {
	base = process.env.STIPPLE_E2E_URL!;
	const make = () => playwright.request.newContext({ baseURL: base });
	for (const a of ACTORS) ctx[a] = await make();
	for (const role of ['admin', 'engineer', 'inspector', 'toolmaker', 'viewer'] as const) {
		const res = await signIn(ctx[role], `${role}@example.com`, DEMO_PASSWORD);
		if (role === 'admin')
			signInCookies = res
				.headersArray()
				.filter((h) => h.name.toLowerCase() === 'set-cookie')
				.map((h) => h.value);
	}

	// Another organisation: a fresh account through the sign-up form, then its own plant.
	const email = unique('matrix-outsider');
	const up = await ctx.other.post('/sign-up', {
		form: { name: 'Mara Outsider', email, password: OTHER_PASSWORD },
		headers: { origin: base, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(up.status(), await up.text()).toBe(303);
	const org = await ctx.other.post('/api/v1/organizations', { data: { name: 'Outsider Mouldings' } });
	expect(org.status(), await org.text()).toBe(201);
	const me = await getJson<{ role: string; organization: { id: string } }>(ctx.other, '/api/v1/me');
	expect(me.role).toBe('admin');
	ids.otherOrgId = me.organization.id;

	// A station key in the outsider's own plant, so the page scan has a real secret and hash to look for.
	const part = await ctx.other.post('/api/v1/parts', { data: { number: 'OM-1', name: 'Outsider part' } });
	expect(part.status(), await part.text()).toBe(201);
	const key = await ctx.other.post('/api/v1/station-keys', {
		data: { name: 'Matrix station', partIds: [(await part.json()).part.id] }
	});
	expect(key.status(), await key.text()).toBe(201);
	const { secret } = (await key.json()) as { secret: string };
	secrets.push({ label: 'a station key secret', value: secret });
	secrets.push({ label: 'a station key hash', value: createHash('sha256').update(secret).digest('hex') });

	await lookUpDemo(ctx.admin);
	for (const a of ACTORS) {
		const token = await sessionToken(ctx[a]);
		if (token) secrets.push({ label: `the session token of ${a}`, value: token });
	}
	secrets.push({ label: 'BETTER_AUTH_SECRET', value: authSecretOfTheRun() });
	secrets.push({ label: 'the demo password', value: DEMO_PASSWORD });
	secrets.push({ label: "the outsider's password", value: OTHER_PASSWORD });
});

test.afterAll(async () => {
	for (const a of ACTORS) await ctx[a]?.dispose();
});

function resolveParams(params: Record<string, string> = {}) {
	return Object.fromEntries(
		Object.entries(params).map(([k, v]) => [k, v === RANDOM ? randomUUID() : v.startsWith('@') ? ids[v.slice(1)]! : v])
	);
}

function bodyFor(row: Row, actor: Actor) {
	const b: Body | undefined = actor === 'other' && row.foreign ? row.foreign : row.body;
	return typeof b === 'function' ? b(ids) : b;
}

interface Answer {
	status: number;
	location: string | null;
	text: string;
}

/** One call of a row by one actor, never following redirects. Form actions answer in JSON (use:enhance). */
async function call(kind: 'API' | 'PAGE' | 'ACTION', method: string, url: string, row: Row, actor: Actor) {
	const request = ctx[actor];
	const body = bodyFor(row, actor);
	const headers: Record<string, string> = {
		origin: base,
		accept: kind === 'PAGE' ? 'text/html' : 'application/json'
	};
	const options: Parameters<APIRequestContext['fetch']>[1] = { method, headers, maxRedirects: 0 };
	if (body && 'json' in body) options.data = body.json;
	else if (body && 'bytes' in body) {
		options.data = Buffer.from(body.bytes);
		headers['content-type'] = body.type;
	} else if (body && 'form' in body) options.form = body.form;
	else if (kind === 'ACTION') options.form = {};
	const res = await request.fetch(url, options);
	return answerOf(kind, res);
}

async function answerOf(kind: string, res: APIResponse): Promise<Answer> {
	const text = await res.text();
	const answer = { status: res.status(), location: res.headers()['location'] ?? null, text };
	if (kind !== 'ACTION' || res.status() !== 200) return answer;
	// SvelteKit answers an enhanced form post with 200 and the outcome in the body.
	const result = JSON.parse(text) as { type: string; status?: number; location?: string };
	if (result.type === 'failure') return { ...answer, status: result.status! };
	if (result.type === 'redirect') return { ...answer, status: result.status!, location: result.location! };
	return answer;
}

/** Server-sent events: the status and content type, then the stream is aborted. */
async function callStream(url: string, actor: Actor): Promise<Answer> {
	const { cookies } = await ctx[actor].storageState();
	const abort = new AbortController();
	const res = await fetch(new URL(url, base), {
		headers: { cookie: cookies.map((c) => `${c.name}=${c.value}`).join('; '), accept: 'text/event-stream' },
		redirect: 'manual',
		signal: abort.signal
	});
	const type = res.headers.get('content-type') ?? '';
	abort.abort();
	if (res.status === 200 && !type.startsWith('text/event-stream'))
		return { status: 599, location: null, text: `content-type ${type}` };
	return { status: res.status, location: null, text: type };
}

/** Runs every row of one kind; gives back one line per actor whose answer is not the table's. */
async function runMatrix(kind: 'API' | 'PAGE' | 'ACTION', table: Record<string, Row> = TABLE) {
	const wrong: string[] = [];
	const skipped: string[] = [];
	const seen: string[] = [];
	let expectedAnswers = 0;
	for (const [key, row] of Object.entries(table)) {
		const [head, rest] = [key.slice(0, key.indexOf(' ')), key.slice(key.indexOf(' ') + 1)];
		const rowKind = head === 'PAGE' ? 'PAGE' : head === 'ACTION' ? 'ACTION' : 'API';
		if (rowKind !== kind) continue;
		if (row.skipFor) skipped.push(`${key} as ${row.skipFor.actors.join(', ')}: ${row.skipFor.reason}`);
		if (row.skip) {
			skipped.push(`${key}: ${row.skip}`);
			continue;
		}
		const [dir, action] = rest.split('?/') as [string, string | undefined];
		const expected = parseExpect(row.expect);
		const method = kind === 'PAGE' ? 'GET' : kind === 'ACTION' ? 'POST' : head;
		const actors = ACTORS.filter((a) => !row.skipFor?.actors.includes(a));
		expectedAnswers += actors.length;
		await Promise.all(
			actors.map(async (actor) => {
				let url = urlOf(dir, ids, resolveParams(row.params));
				if (action && action !== 'default') url += `?/${action}`;
				if (row.query) url += `${url.includes('?') ? '&' : '?'}${row.query}`;
				const got = row.stream ? await callStream(url, actor) : await call(kind, method, url, row, actor);
				const want = expected[actor];
				seen.push(`${key}\t${actor}\t${describeOutcome(want)}\t${got.status}`);
				if (!matches(want, got.status, got.location, kind === 'PAGE'))
					wrong.push(
						`${key} as ${actor}: expected ${describeOutcome(want)}, got ${got.status}` +
							`${got.location ? `>${got.location}` : ''} ${got.text.replace(/\s+/g, ' ').slice(0, 160)}`
					);
			})
		);
	}
	if (skipped.length) test.info().annotations.push({ type: 'skipped rows', description: skipped.join('\n') });
	// The evidence: every route, actor, expected outcome and answer, beside the test's results.
	await test.info().attach(`access-matrix-${kind.toLowerCase()}.tsv`, {
		body: ['route\tactor\texpected\tgot', ...seen.sort()].join('\n'),
		contentType: 'text/tab-separated-values'
	});
	expect(seen.length, 'answers collected').toBe(expectedAnswers);
	expect(expectedAnswers).toBeGreaterThan(0);
	return wrong.sort();
}

test('every route on disk has a row in the table, and every row a route', () => {
	const onDisk = routesOnDisk(ROUTES).map(tableKey);
	const inTable = Object.keys(TABLE);
	expect(onDisk.length).toBeGreaterThan(100);
	expect(
		onDisk.filter((k) => !inTable.includes(k)),
		'routes without a row'
	).toEqual([]);
	expect(
		inTable.filter((k) => !onDisk.includes(k)),
		'rows without a route'
	).toEqual([]);
	for (const [key, row] of Object.entries(TABLE)) {
		if (row.skip) continue;
		expect(() => parseExpect(row.expect), key).not.toThrow();
		// A row that answers 404 to an allowed role must say why (random id, nothing to find).
		if (/\b(admin|engineer|inspector|toolmaker|viewer|members):404\b/.test(row.expect))
			expect(row.note, key).toBeTruthy();
	}
});

test('API: every method answers each actor as the table says', async () => {
	expect(await runMatrix('API')).toEqual([]);
});

test('pages: every page answers each actor as the table says', async () => {
	expect(await runMatrix('PAGE')).toEqual([]);
});

test('form actions: every action checks its role as the table says', async () => {
	expect(await runMatrix('ACTION')).toEqual([]);
});

test("better-auth's own endpoints are closed, so nothing goes around Stipple's roles and brakes", async () => {
	expect(await runMatrix('API', AUTH_TABLE)).toEqual([]);
});

test("another organisation's admin does not read Fernwick's mail in the Mailbox", async () => {
	// A password reset for a Fernwick member puts a mail (with its reset link) in the catcher.
	const forgot = await ctx.anon.post('/forgot', {
		form: { email: 'viewer@example.com' },
		headers: { origin: base, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(forgot.status(), await forgot.text()).toBeLessThan(400);
	const mailbox = async (who: Actor) => (await ctx[who].get('/mailbox/__data.json')).text();
	// The control: Fernwick's own admin sees it, so the check below can fail.
	await expect.poll(() => mailbox('admin')).toContain('viewer@example.com');
	// Found by this test and fixed: the Mailbox showed every organisation's caught mail, reset links
	// included, to any admin (anyone who signs up is one). It now shows mail to its own people only.
	const foreign = await mailbox('other');
	expect(foreign).not.toContain('viewer@example.com');
	expect(foreign).not.toContain('/reset?token=');
});

test('a cross-origin form post is refused (CSRF)', async () => {
	const evil = { origin: 'http://evil.example', accept: 'text/html' };
	const signInAttempt = await ctx.anon.post('/sign-in', {
		form: form('engineer@example.com', DEMO_PASSWORD),
		headers: evil,
		maxRedirects: 0
	});
	expect(signInAttempt.status()).toBe(403);
	expect(signInAttempt.headers()['set-cookie'] ?? '').not.toContain('session_token');

	const create = await ctx.engineer.post('/setup/parts?/create', {
		form: { number: 'CSRF-1', name: 'Cross-site part' },
		headers: evil,
		maxRedirects: 0
	});
	expect(create.status()).toBe(403);
	// text/plain is a "simple" content type a foreign page may send without a preflight.
	const plain = await ctx.engineer.post('/api/v1/parts', {
		data: Buffer.from('{"number":"CSRF-2","name":"Cross-site part"}'),
		headers: { origin: 'http://evil.example', 'content-type': 'text/plain' }
	});
	expect(plain.status()).toBe(403);
	expect(((await plain.json()) as { error: { code: string } }).error.code).toBe('cross_site');
	const { parts } = await getJson<{ parts: { number: string }[] }>(ctx.engineer, '/api/v1/parts?q=CSRF');
	expect(parts.filter((p) => p.number.startsWith('CSRF-'))).toEqual([]);

	// No CORS grant: a foreign page cannot read the API's answers with the user's cookie.
	const read = await ctx.engineer.get('/api/v1/me', { headers: { origin: 'http://evil.example' } });
	expect(read.headers()['access-control-allow-origin']).toBeUndefined();
	expect(read.headers()['access-control-allow-credentials']).toBeUndefined();
});

test('the session cookie is HttpOnly and SameSite=Lax; not Secure on plain http', () => {
	const auth = signInCookies.filter((c) => c.startsWith('better-auth.') || c.startsWith('__Secure-better-auth.'));
	const session = auth.find((c) => /^(__Secure-)?better-auth\.session_token=/.test(c));
	expect(session, signInCookies.join('\n')).toBeDefined();
	for (const c of auth) {
		const flags = c
			.split(';')
			.slice(1)
			.map((f) => f.trim().toLowerCase());
		expect(flags, c).toContain('httponly');
		expect(
			flags.some((f) => f === 'samesite=lax' || f === 'samesite=strict'),
			c
		).toBe(true);
		expect(flags, c).toContain('path=/');
		// better-auth marks cookies Secure (and prefixes __Secure-) only when its base URL is https://.
		// The e2e app is served on http://127.0.0.1, where a browser would drop a Secure cookie; behind
		// an https ORIGIN it is set (the deployment's concern, not checked here).
		expect(flags, c).not.toContain('secure');
		expect(c.startsWith('__Secure-'), c).toBe(false);
	}
});

test('pages and API answers carry the security headers', async () => {
	const page = await ctx.engineer.get('/setup', { headers: { accept: 'text/html' } });
	expect(page.status()).toBe(200);
	const csp = page.headers()['content-security-policy'] ?? '';
	const directives = new Map(
		csp
			.split(';')
			.map((d) => d.trim().split(/\s+/))
			.filter((d) => d[0])
			.map(([name, ...values]) => [name!, values])
	);
	const script = directives.get('script-src') ?? directives.get('default-src');
	expect(script, csp).toBeDefined();
	expect(script, csp).not.toContain("'unsafe-inline'");
	expect(script, csp).not.toContain("'unsafe-eval'");
	expect(
		script!.some((v) => v.startsWith("'nonce-") || v.startsWith("'sha")),
		csp
	).toBe(true);
	expect(directives.get('frame-ancestors'), csp).toEqual(["'none'"]);
	expect(directives.get('object-src'), csp).toEqual(["'none'"]);
	expect(directives.get('base-uri'), csp).toEqual(["'self'"]);

	const api = await ctx.engineer.get('/api/v1/parts');
	for (const res of [page, api, await ctx.anon.get('/api/v1/me')]) {
		const h = res.headers();
		expect(h['x-content-type-options'], res.url()).toBe('nosniff');
		expect(h['x-frame-options'], res.url()).toBe('DENY');
		expect(['no-referrer', 'same-origin', 'strict-origin', 'strict-origin-when-cross-origin']).toContain(
			h['referrer-policy']
		);
	}
	// Observation for the report, not a requirement of this spec: JSON answers carry no CSP of their own.
	test.info().annotations.push({
		type: 'API CSP',
		description: api.headers()['content-security-policy'] ?? '(none on /api/v1 answers)'
	});
	test.info().annotations.push({ type: 'page CSP', description: csp });
});

test('repeated wrong passwords for one e-mail are braked (429) within 11 tries', async () => {
	// throttle.ts: 10 attempts per address and e-mail in 15 minutes; the 11th is refused.
	const email = unique('matrix-throttle');
	const statuses: number[] = [];
	for (let i = 0; i < 11; i++) {
		const res = await ctx.anon.post('/sign-in', {
			form: form(email, `wrong password ${i}`),
			headers: { origin: base, accept: 'text/html' },
			maxRedirects: 0
		});
		statuses.push(res.status());
		if (res.status() === 429) {
			expect(await res.text()).toContain('Too many attempts');
			break;
		}
	}
	expect(statuses.at(-1), statuses.join(' ')).toBe(429);
	expect(
		statuses.slice(0, -1).every((s) => s === 401 || s === 400),
		statuses.join(' ')
	).toBe(true);
});

const HASHES: { label: string; pattern: RegExp }[] = [
	{ label: 'an argon2 hash', pattern: /\$argon2(id|i|d)\$/ },
	{ label: 'a scrypt hash', pattern: /\$scrypt\$/ },
	{ label: 'a bcrypt hash', pattern: /\$2[aby]\$\d\d\$/ },
	// better-auth's own scrypt format: hex salt (16 bytes) ':' hex key (64 bytes).
	{ label: 'a better-auth password hash', pattern: /\b[0-9a-f]{32}:[0-9a-f]{128}\b/ },
	{
		label: 'a secret field',
		pattern: /"(password|passwordHash|secretHash|sessionToken|accessToken|refreshToken|idToken)"\s*:/
	}
];

test('no page (HTML or __data.json) shows a password, a hash, the auth secret, a key or a session token', async () => {
	const leaks: string[] = [];
	const pages = Object.entries(TABLE).filter(([k, r]) => k.startsWith('PAGE ') && !r.skip);
	let scanned = 0;
	for (const actor of ACTORS) {
		await Promise.all(
			pages.map(async ([key, row]) => {
				if (parseExpect(row.expect)[actor].kind !== 'ok') return;
				const url = urlOf(key.slice(5), ids, resolveParams(row.params));
				const data = `${url === '/' ? '' : url}/__data.json`;
				for (const [u, accept] of [
					[url, 'text/html'],
					[data, 'application/json']
				] as const) {
					const res = await ctx[actor].get(u, { headers: { accept }, maxRedirects: 0 });
					const text = await res.text();
					scanned++;
					for (const s of secrets) if (text.includes(s.value)) leaks.push(`${u} as ${actor}: ${s.label}`);
					for (const h of HASHES) if (h.pattern.test(text)) leaks.push(`${u} as ${actor}: ${h.label}`);
				}
			})
		);
	}
	expect(scanned).toBeGreaterThan(150);
	expect(leaks).toEqual([]);
});
