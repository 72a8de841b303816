/**
 * What the benchmark runner and its *.bench.ts files share: the context the runner hands each
 * benchmark, the report a benchmark hands back, an HTTP session with a cookie jar, percentiles,
 * a plain aligned table, CPU time read from /proc, Debian's Chromium, and the demo's rows looked
 * up in the database (with a sample made there). Figures only; nothing here ever fails on speed.
 */
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import { chromium, type Browser, type BrowserContext } from '@playwright/test';
import type postgres from 'postgres';
import type { MarkerColour, MarkerShape } from '../../src/lib/markers';

/** What run.ts started for this run, all on 127.0.0.1. */
export interface BenchContext {
	/** The built app, e.g. http://127.0.0.1:41234 */
	url: string;
	/** The throwaway cluster the app uses (the demo organisation is seeded). */
	databaseUrl: string;
	/** The app's process id, for CPU figures. */
	appPid: number;
	/** The postmaster's process id, for CPU figures (null when unknown). */
	postgresPid: number | null;
	/** The app's stdout and stderr. */
	appLog: string;
}

export type Cell = string | number | null;

export interface BenchReport {
	columns: string[];
	rows: Record<string, Cell>[];
	/** Printed under the table: ratios, checks, warnings, diagnostics. */
	lines: string[];
}

export interface Bench {
	title: string;
	run(ctx: BenchContext): Promise<BenchReport>;
}

export function defineBench(bench: Bench): Bench {
	return bench;
}

export function isBench(value: unknown): value is Bench {
	return (
		typeof value === 'object' &&
		value !== null &&
		typeof (value as Bench).title === 'string' &&
		typeof (value as Bench).run === 'function'
	);
}

/** Nearest-rank percentile of ascending `sorted` (q in 0..1); null when there is nothing. */
export function percentile(sorted: readonly number[], q: number): number | null {
	if (!sorted.length) return null;
	const rank = Math.min(sorted.length, Math.max(1, Math.ceil(q * sorted.length)));
	return sorted[rank - 1]!;
}

/** Milliseconds with one decimal, or '–'. */
export const ms = (v: number | null) => (v === null ? '–' : v.toFixed(1));

const NUMBER = /^-?\d+(\.\d+)?$/;

/** A plain text table: number columns (numbers, numeric text, '–') right-aligned, text left-aligned. */
export function formatTable(columns: readonly string[], rows: readonly Record<string, Cell>[]): string {
	const text = (c: Cell | undefined) => (c === null || c === undefined ? '–' : String(c));
	const widths = columns.map((col) => Math.max(col.length, ...rows.map((r) => text(r[col]).length)));
	const numeric = columns.map((col) =>
		rows.every(
			(r) => typeof r[col] === 'number' || r[col] === null || NUMBER.test(text(r[col])) || text(r[col]) === '–'
		)
	);
	const line = (cells: string[]) =>
		cells
			.map((c, i) => (numeric[i] ? c.padStart(widths[i]!) : c.padEnd(widths[i]!)))
			.join('  ')
			.trimEnd();
	return [
		line([...columns]),
		line(widths.map((w) => '-'.repeat(w))),
		...rows.map((r) => line(columns.map((col) => text(r[col]))))
	].join('\n');
}

/** Runs `workers` copies of `fn` at once and waits for all of them. */
export async function concurrently(workers: number, fn: (worker: number) => Promise<void>): Promise<void> {
	await Promise.all(Array.from({ length: workers }, (_, i) => fn(i)));
}

export interface HttpAnswer {
	status: number;
	body: string;
	/** Milliseconds from sending until the whole body was read. */
	elapsed: number;
}

/**
 * One signed-in client of the app: keeps the cookies it is given and sends them back, as a
 * browser would. Requests stay on the app's own loopback address.
 */
export class HttpSession {
	private readonly cookies = new Map<string, string>();

	constructor(readonly base: string) {
		const host = new URL(base).hostname;
		if (host !== '127.0.0.1') throw new Error(`Benchmarks talk to 127.0.0.1 only, not ${host}.`);
	}

	private remember(res: Response) {
		for (const header of res.headers.getSetCookie()) {
			const pair = header.split(';', 1)[0]!;
			const eq = pair.indexOf('=');
			if (eq > 0) this.cookies.set(pair.slice(0, eq).trim(), pair.slice(eq + 1).trim());
		}
	}

	private cookieHeader(): Record<string, string> {
		if (!this.cookies.size) return {};
		return { cookie: [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ') };
	}

	/** Signs in through the sign-in form, as a browser without JavaScript does (303, not followed). */
	async signIn(email: string, password: string): Promise<void> {
		const res = await fetch(`${this.base}/sign-in`, {
			method: 'POST',
			redirect: 'manual',
			headers: {
				'content-type': 'application/x-www-form-urlencoded',
				origin: this.base,
				accept: 'text/html',
				...this.cookieHeader()
			},
			body: new URLSearchParams({ email, password }).toString(),
			signal: AbortSignal.timeout(30_000)
		});
		const body = await res.text();
		if (res.status !== 303) throw new Error(`Signing in as ${email} answered ${res.status}: ${body.slice(0, 300)}`);
		this.remember(res);
		if (!this.cookies.size) throw new Error(`Signing in as ${email} set no cookie.`);
	}

	/** One request; never throws on a status, only on a network failure or the timeout. */
	async request(method: string, pathname: string, json?: unknown, timeoutMs = 30_000): Promise<HttpAnswer> {
		const started = performance.now();
		const res = await fetch(`${this.base}${pathname}`, {
			method,
			redirect: 'manual',
			headers: {
				accept: 'application/json',
				...(json === undefined ? {} : { 'content-type': 'application/json' }),
				...this.cookieHeader()
			},
			body: json === undefined ? undefined : JSON.stringify(json),
			signal: AbortSignal.timeout(timeoutMs)
		});
		const body = await res.text();
		return { status: res.status, body, elapsed: performance.now() - started };
	}

	/** Sends `bytes` as the body (an upload), with the session's cookies. */
	async upload(pathname: string, bytes: Buffer, contentType: string, timeoutMs = 120_000): Promise<HttpAnswer> {
		const started = performance.now();
		const res = await fetch(`${this.base}${pathname}`, {
			method: 'POST',
			redirect: 'manual',
			headers: { accept: 'application/json', 'content-type': contentType, ...this.cookieHeader() },
			body: new Uint8Array(bytes),
			signal: AbortSignal.timeout(timeoutMs)
		});
		const body = await res.text();
		return { status: res.status, body, elapsed: performance.now() - started };
	}

	/** A request that must answer `expect`; its JSON body. */
	async json<T>(method: string, pathname: string, body?: unknown, expect: number | number[] = 200): Promise<T> {
		const answer = await this.request(method, pathname, body);
		const allowed = Array.isArray(expect) ? expect : [expect];
		if (!allowed.includes(answer.status))
			throw new Error(`${method} ${pathname} answered ${answer.status}: ${answer.body.slice(0, 300)}`);
		return JSON.parse(answer.body) as T;
	}
}

/** USER_HZ: /proc/<pid>/stat counts CPU time in these ticks (100 on Linux on every common architecture). */
const TICKS_PER_SECOND = 100;

/** utime + stime + the same for children it has waited for, in seconds; null when unreadable. */
function cpuOf(pid: number): { cpu: number; ppid: number } | null {
	try {
		const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
		// The name (field 2) may hold spaces; everything after its closing parenthesis is fixed.
		const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
		const n = (i: number) => Number(fields[i - 3]);
		return { cpu: (n(14) + n(15) + n(16) + n(17)) / TICKS_PER_SECOND, ppid: n(4) };
	} catch {
		return null;
	}
}

/**
 * CPU seconds used so far by a process and everything under it (live descendants, plus the
 * children it has already waited for). Null where /proc is not there.
 */
export function cpuSecondsOfTree(root: number | null): number | null {
	if (root === null || os.platform() !== 'linux') return null;
	const self = cpuOf(root);
	if (!self) return null;
	const children = new Map<number, number[]>();
	const cpu = new Map<number, number>();
	for (const entry of fs.readdirSync('/proc')) {
		if (!/^\d+$/.test(entry)) continue;
		const pid = Number(entry);
		const s = cpuOf(pid);
		if (!s) continue;
		cpu.set(pid, s.cpu);
		children.set(s.ppid, [...(children.get(s.ppid) ?? []), pid]);
	}
	let total = self.cpu;
	const queue = [...(children.get(root) ?? [])];
	while (queue.length) {
		const pid = queue.pop()!;
		total += cpu.get(pid) ?? 0;
		queue.push(...(children.get(pid) ?? []));
	}
	return total;
}

/** The demo's password, the same for every demo user (src/lib/server/config.ts). */
export const DEMO_PASSWORD = 'pin-the-defects';

/** Debian's Chromium, headless, as the end-to-end tests run it; never a downloaded browser. */
export function launchChromium(): Promise<Browser> {
	return chromium.launch({
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		headless: true,
		args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking']
	});
}

/**
 * A context of `browser` whose pages can run functions compiled by tsx: tsx (esbuild's keepNames)
 * wraps named inner functions in `__name(fn, "name")`, which page.evaluate carries into the page,
 * where no `__name` exists. Every document of the context gets a do-nothing one first.
 */
export async function newContext(browser: Browser, options: Parameters<Browser['newContext']>[0] = {}) {
	const context = await browser.newContext(options);
	await context.addInitScript({ content: 'globalThis.__name = (fn) => fn;' });
	return context;
}

/**
 * Signs a browser context in through the sign-in form (as a browser without JavaScript does), so
 * its pages start signed in and the sign-in itself is not part of what they measure.
 */
export async function signInContext(context: BrowserContext, base: string, email: string, password = DEMO_PASSWORD) {
	const res = await context.request.post(`${base}/sign-in`, {
		form: { email, password },
		headers: { origin: base, accept: 'text/html' },
		maxRedirects: 0,
		timeout: 30_000
	});
	if (res.status() !== 303)
		throw new Error(`Signing in as ${email} answered ${res.status()}: ${(await res.text()).slice(0, 300)}`);
	if (!(await context.cookies(base)).length) throw new Error(`Signing in as ${email} set no cookie.`);
}

export interface DemoType {
	id: string;
	code: string;
	colour: MarkerColour;
	shape: MarkerShape;
}

/** The seeded demo as the database has it: FW-118, its Front view's newest revision, its types. */
export interface Demo {
	orgId: string;
	partId: string;
	/** User ids by e-mail. */
	users: Map<string, string>;
	front: { revisionId: string; width: number; height: number; gridColumns: number | null; gridRows: number | null };
	/** The active types the Bench offers for FW-118, in palette order. */
	types: DemoType[];
}

export async function demoRows(sql: postgres.Sql): Promise<Demo> {
	const [p] = await sql<{ orgId: string; partId: string }[]>`
		SELECT p.organization_id AS "orgId", p.id AS "partId"
		FROM part p JOIN organization o ON o.id = p.organization_id
		WHERE o.slug = 'fernwick' AND p.number = 'FW-118'`;
	if (!p) throw new Error('The demo part FW-118 is not there (was the demo seeded?).');
	const users = await sql<{ id: string; email: string }[]>`
		SELECT u.id, u.email FROM "user" u JOIN member m ON m.user_id = u.id WHERE m.organization_id = ${p.orgId}`;
	const [front] = await sql<Demo['front'][]>`
		SELECT r.id AS "revisionId", r.width, r.height, r.grid_columns AS "gridColumns", r.grid_rows AS "gridRows"
		FROM part_view v JOIN view_revision r ON r.view_id = v.id
		WHERE v.part_id = ${p.partId} AND v.name = 'Front'
		ORDER BY r.revision DESC LIMIT 1`;
	if (!front) throw new Error('FW-118 has no Front drawing.');
	const types = await sql<DemoType[]>`
		SELECT t.id, t.code, t.colour, t.shape FROM defect_type t
		WHERE t.organization_id = ${p.orgId} AND t.retired_at IS NULL
			AND (t.all_parts OR EXISTS (SELECT 1 FROM defect_type_part dp WHERE dp.defect_type_id = t.id AND dp.part_id = ${p.partId}))
		ORDER BY t.position, t.code`;
	if (!types.length) throw new Error('FW-118 has no active defect type.');
	return { ...p, users: new Map(users.map((u) => [u.email, u.id])), front, types };
}

export interface SeededPin {
	unitIndex: number;
	defectTypeId: string;
	x: number;
	y: number;
	zone: string | null;
}

/**
 * An open sample of FW-118 written straight into the database, with its units and pins on the
 * Front view. Units listed in `clean` are marked clean. Returns its id; `sql` deletes it again
 * with `deleteSample` (units and pins go with it).
 */
export async function insertSample(
	sql: postgres.Sql,
	demo: Demo,
	inspectorEmail: string,
	options: { units: number; clean?: number[]; pins?: SeededPin[] }
): Promise<string> {
	const inspectorId = demo.users.get(inspectorEmail);
	if (!inspectorId) throw new Error(`${inspectorEmail} is not a member of the demo organisation.`);
	const id = randomUUID();
	const clean = new Set(options.clean ?? []);
	await sql.begin(async (tx) => {
		await tx`
			INSERT INTO sample (id, organization_id, part_id, inspector_id, size, unit_count, state)
			VALUES (${id}, ${demo.orgId}, ${demo.partId}, ${inspectorId}, ${options.units}, ${options.units}, 'open')`;
		const units = Array.from({ length: options.units }, (_, i) => ({
			sample_id: id,
			index: i + 1,
			clean: clean.has(i + 1)
		}));
		await tx`INSERT INTO sample_unit ${tx(units)}`;
		const pins = (options.pins ?? []).map((p, i) => ({
			id: randomUUID(),
			organization_id: demo.orgId,
			sample_id: id,
			unit_index: p.unitIndex,
			revision_id: demo.front.revisionId,
			defect_type_id: p.defectTypeId,
			x: p.x,
			y: p.y,
			zone: p.zone,
			note: '',
			created_by: inspectorId,
			// Distinct times keep the Bench's order (oldest first) the order they were made in.
			created_at: new Date(Date.UTC(2026, 0, 5, 8) + i)
		}));
		// 1,000 rows of 12 columns stay well under PostgreSQL's 65,535 parameters per statement.
		for (let i = 0; i < pins.length; i += 1_000) await tx`INSERT INTO pin ${tx(pins.slice(i, i + 1_000))}`;
	});
	return id;
}

export async function deleteSample(sql: postgres.Sql, sampleId: string): Promise<void> {
	await sql`DELETE FROM sample WHERE id = ${sampleId}`;
}
