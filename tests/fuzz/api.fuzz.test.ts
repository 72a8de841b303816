/**
 * Property-based fuzzing of every JSON API route on disk (src/routes/api/**\/+server.ts, found
 * from the file system so a new route cannot be missed), against the built app and a real
 * PostgreSQL: random and malformed path ids, queries and bodies (shaped after the route's
 * OpenAPI schema where it has one, plus broken JSON, wrong content types and deep nesting),
 * mostly as the demo admin, whom no role check stops. The property: never a 5xx, every 4xx in
 * the API's error shape, and the app is still up afterwards with no server error in its log.
 * Fixed seed; FUZZ_CASES (default 10,000) cases in all.
 */
import fs from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import postgres from 'postgres';
import { afterAll, beforeAll, expect, test } from 'vitest';
import { routesOnDisk, urlOf } from '../e2e/access-table';
import { startAppServer, type AppServer } from '../fixtures/app-server';
import { signInCookie } from '../fixtures/sign-in';
import { valueFor, wild, type JsonSchema } from './schema-arbitrary';

const ROUTES = path.resolve(import.meta.dirname, '../../src/routes');
const CASES = Number(process.env.FUZZ_CASES ?? 10_000);
const SEED = 20_261_202;
/** Routes fuzzed at once (each one's cases run in order, so a failure shrinks cleanly). */
const PARALLEL = 6;

interface Operation {
	method: string;
	/** The route dir under src/routes, e.g. api/v1/parts/[partId=uuid]. */
	dir: string;
	params: string[];
	body?: JsonSchema;
	/** The body's media types, from the OpenAPI document (JSON when it has none). */
	bodyTypes: string[];
	query: { name: string; schema: JsonSchema }[];
}

interface Case {
	who: 'admin' | 'anonymous' | 'forged';
	params: Record<string, string>;
	query: [string, string][];
	body: { kind: 'none' } | { kind: 'json'; value: unknown } | { kind: 'raw'; text: string; type: string };
}

let server: AppServer;
let adminCookie = '';
const idsByParam: Record<string, string[]> = {};
const tally = new Map<string, number>();

/** Real ids of the demo, by route parameter name, read from the database: deeper checks get reached. */
async function realIds(sql: postgres.Sql) {
	const pick = async (table: string, where = 'true') =>
		(await sql.unsafe<{ id: string }[]>(`SELECT id::text AS id FROM ${table} WHERE ${where} LIMIT 4`)).map((r) => r.id);
	Object.assign(idsByParam, {
		partId: await pick('part'),
		viewId: await pick('part_view'),
		revisionId: await pick('view_revision'),
		regionId: await pick('region'),
		defectTypeId: await pick('defect_type'),
		toolId: await pick('tool'),
		sampleId: await pick('sample', "state = 'closed'"),
		pinId: await pick('pin'),
		photoId: [...(await pick('pin_photo')), ...(await pick('repair_photo'))],
		limitSetId: await pick('limit_set'),
		importId: await pick('history_import'),
		repairId: await pick('repair'),
		signalId: await pick('signal'),
		keyId: await pick('station_key'),
		// Not the admin's own membership: a fuzzed role change must not lock the fuzzer out.
		memberId: await pick('member', `role <> 'admin'`),
		invitationId: await pick('invitation')
	});
}

/** What the OpenAPI document says of each operation's body and query. */
async function documented(base: string) {
	const doc = (await (await fetch(`${base}/api/v1/openapi.json`)).json()) as {
		paths: Record<
			string,
			Record<
				string,
				{
					parameters?: { in: string; name: string; schema: JsonSchema }[];
					requestBody?: { content: Record<string, { schema: JsonSchema }> };
				}
			>
		>;
	};
	const out = new Map<string, { body?: JsonSchema; bodyTypes: string[]; query: Operation['query'] }>();
	for (const [p, ops] of Object.entries(doc.paths)) {
		for (const [method, op] of Object.entries(ops)) {
			const content = op.requestBody?.content ?? {};
			out.set(`${method.toUpperCase()} /api/v1${p}`, {
				body: content['application/json']?.schema,
				bodyTypes: Object.keys(content),
				query: (op.parameters ?? []).filter((q) => q.in === 'query').map((q) => ({ name: q.name, schema: q.schema }))
			});
		}
	}
	return out;
}

/** The OpenAPI path of a route dir: api/v1/parts/[partId=uuid] → /api/v1/parts/{partId}. */
const openApiPath = (dir: string) => `/${dir.replace(/\[([A-Za-z]+)(?:=[a-z]+)?\]/g, '{$1}')}`;

function operations(docs: Awaited<ReturnType<typeof documented>>): Operation[] {
	return routesOnDisk(ROUTES)
		.filter((k) => / api\//.test(k))
		.map((k) => {
			const [method, dir] = k.split(' ') as [string, string];
			const doc = docs.get(`${method} ${openApiPath(dir)}`);
			return {
				method,
				dir,
				params: [...dir.matchAll(/\[([A-Za-z]+)(?:=[a-z]+)?\]/g)].map((m) => m[1]!),
				body: doc?.body,
				bodyTypes: doc?.bodyTypes ?? [],
				query: doc?.query ?? []
			};
		});
}

const junkSegment = fc.oneof(
	fc.string({ minLength: 1, maxLength: 40 }),
	fc.constantFrom('0', '-1', '1e9', 'null', 'undefined', '%00', '..', 'ÿ', 'x'.repeat(300)),
	fc.uuid().map((u) => u.toUpperCase()),
	fc.uuid().map((u) => `${u}x`)
);

function paramArb(op: Operation, name: string): fc.Arbitrary<string> {
	const special: Record<string, fc.Arbitrary<string>> = {
		index: fc.oneof(fc.integer({ min: -5, max: 600 }).map(String), junkSegment),
		file: fc.oneof(fc.constantFrom('display.webp', 'thumb.webp', 'original', 'display.png'), junkSegment)
	};
	if (special[name]) return special[name];
	const real = idsByParam[name] ?? [];
	// DELETE never gets a real id: the fuzzer must not tear the demo down under itself.
	const known = op.method !== 'DELETE' && real.length ? [{ weight: 4, arbitrary: fc.constantFrom(...real) }] : [];
	return fc.oneof(...known, { weight: 2, arbitrary: fc.uuid() }, { weight: 1, arbitrary: junkSegment });
}

function queryArb(op: Operation): fc.Arbitrary<[string, string][]> {
	// Query values stay under 2,000 characters: Node refuses a request line and headers over 16 KB
	// with a bare 431 before Stipple sees the request.
	const text = (v: unknown) => (typeof v === 'string' ? v : (JSON.stringify(v) ?? '')).slice(0, 2_000);
	const named = op.query.map((q) =>
		fc.tuple(fc.constant(q.name), valueFor(q.schema, Object.values(idsByParam).flat()).map(text))
	);
	const stranger = fc.tuple(fc.string({ maxLength: 10 }), wild.map(text));
	const pair = named.length
		? fc.oneof({ weight: 4, arbitrary: fc.oneof(...named) }, { weight: 1, arbitrary: stranger })
		: stranger;
	return fc.array(pair, { maxLength: 5 });
}

function bodyArb(op: Operation): fc.Arbitrary<Case['body']> {
	if (op.method === 'GET' || op.method === 'DELETE') return fc.constant({ kind: 'none' as const });
	const json = op.body ? valueFor(op.body, Object.values(idsByParam).flat()) : wild;
	const deep = fc.integer({ min: 1_000, max: 20_000 }).map((n) => '['.repeat(n) + ']'.repeat(n));
	const types = [
		'application/json',
		'text/plain',
		'application/x-www-form-urlencoded',
		'multipart/form-data; boundary=fuzz',
		'image/png',
		'text/csv',
		...op.bodyTypes
	];
	return fc.oneof(
		{ weight: 6, arbitrary: json.map((value) => ({ kind: 'json' as const, value })) },
		{ weight: 1, arbitrary: fc.constant({ kind: 'none' as const }) },
		{
			weight: 1,
			arbitrary: fc.string({ maxLength: 200 }).map((text) => ({ kind: 'raw' as const, text, type: 'application/json' }))
		},
		{
			weight: 1,
			arbitrary: fc
				.tuple(json, fc.constantFrom(...types))
				.map(([value, type]) => ({ kind: 'raw' as const, text: JSON.stringify(value) ?? '', type }))
		},
		{ weight: 1, arbitrary: deep.map((text) => ({ kind: 'raw' as const, text, type: 'application/json' })) }
	);
}

function caseArb(op: Operation): fc.Arbitrary<Case> {
	return fc.record({
		who: fc.constantFrom<Case['who'][]>(
			'admin',
			'admin',
			'admin',
			'admin',
			'admin',
			'admin',
			'admin',
			'anonymous',
			'forged'
		),
		params: fc.record(Object.fromEntries(op.params.map((p) => [p, paramArb(op, p)]))),
		query: queryArb(op),
		body: bodyArb(op)
	}) as fc.Arbitrary<Case>;
}

/** Sends one case; returns what was wrong with the answer, or null. */
async function send(op: Operation, c: Case): Promise<string | null> {
	const encoded = Object.fromEntries(Object.entries(c.params).map(([k, v]) => [k, encodeURIComponent(v)]));
	const url = new URL(server.url + urlOf(op.dir, encoded));
	for (const [k, v] of c.query) url.searchParams.append(k, v);
	const headers: Record<string, string> = { accept: 'application/json' };
	if (c.who === 'admin') headers.cookie = adminCookie;
	if (c.who === 'forged') headers.cookie = 'better-auth.session_token=forged.c2lnbmF0dXJl; theme=dark';
	if (op.dir.endsWith('station/samples'))
		headers.authorization = c.who === 'forged' ? 'Bearer stk_forged' : 'Basic eDp5';
	let body: string | undefined;
	if (c.body.kind === 'json') {
		headers['content-type'] = 'application/json';
		body = JSON.stringify(c.body.value) ?? 'null';
	} else if (c.body.kind === 'raw') {
		headers['content-type'] = c.body.type;
		body = c.body.text;
	}
	const res = await fetch(url, {
		method: op.method,
		headers,
		body,
		redirect: 'manual',
		signal: AbortSignal.timeout(30_000)
	});
	const type = res.headers.get('content-type') ?? '';
	const key = `${Math.floor(res.status / 100)}xx`;
	tally.set(key, (tally.get(key) ?? 0) + 1);
	if (type.startsWith('text/event-stream')) {
		await res.body?.cancel();
		return res.status === 200 ? null : `a stream with status ${res.status}`;
	}
	const text = await res.text();
	if (res.status >= 500) return `${res.status}: ${text.slice(0, 300)}`;
	if (res.status < 400) return null;
	if (!type.includes('application/json')) return `${res.status} as ${type}: ${text.slice(0, 200)}`;
	const parsed = JSON.parse(text) as { error?: { code?: unknown; message?: unknown } };
	if (typeof parsed.error?.code !== 'string' || typeof parsed.error.message !== 'string' || !parsed.error.message)
		return `${res.status} without the error shape: ${text.slice(0, 200)}`;
	return null;
}

beforeAll(async () => {
	server = await startAppServer('fuzz');
	adminCookie = await signInCookie(server.url, 'admin@example.com');
	const sql = postgres(server.databaseUrl, { max: 1, onnotice: () => {} });
	try {
		await realIds(sql);
	} finally {
		await sql.end();
	}
}, 120_000);

afterAll(async () => {
	await server?.stop();
}, 60_000);

test(`every API route on disk, ${CASES} fuzzed requests in all: never a 5xx, every 4xx in the error shape`, async () => {
	const ops = operations(await documented(server.url));
	expect(ops.length).toBeGreaterThan(60);
	const perOp = Math.ceil(CASES / ops.length);
	const failures: string[] = [];
	let next = 0;
	let sent = 0;
	await Promise.all(
		Array.from({ length: PARALLEL }, async () => {
			while (next < ops.length) {
				const i = next++;
				const op = ops[i]!;
				const property = fc.asyncProperty(caseArb(op), async (c) => {
					sent++;
					const wrong = await send(op, c);
					if (wrong) throw new Error(wrong);
				});
				const run = await fc.check(property, { seed: SEED + i, numRuns: perOp });
				if (run.failed)
					failures.push(
						`${op.method} /${op.dir} (seed ${SEED + i}): ${String(run.errorInstance)}\n  case: ${JSON.stringify(run.counterexample?.[0]).slice(0, 600)}`
					);
			}
		})
	);
	console.log(
		`fuzz: ${ops.length} routes, ${sent} requests (${perOp} cases each, plus shrinking); answers ${[...tally]
			.sort()
			.map(([k, v]) => `${k} ${v}`)
			.join(', ')}`
	);
	if (failures.length)
		console.log(`app log, last lines:\n${fs.readFileSync(server.appLog, 'utf8').split('\n').slice(-60).join('\n')}`);
	expect(failures).toEqual([]);
	expect(sent).toBeGreaterThanOrEqual(CASES);

	// Still up, and it logged no server error (handleError logs every 5xx).
	expect((await fetch(`${server.url}/api/v1/health`)).status).toBe(200);
	const log = fs.readFileSync(server.appLog, 'utf8');
	expect(log.split('\n').filter((l) => /^\[stipple\] (GET|POST|PUT|PATCH|DELETE) /.test(l))).toEqual([]);
}, 600_000);
