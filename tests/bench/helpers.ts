/**
 * What the benchmark runner and its *.bench.ts files share: the context the runner hands each
 * benchmark, the report a benchmark hands back, an HTTP session with a cookie jar, percentiles,
 * a plain aligned table, and CPU time read from /proc. Figures only; nothing here ever fails on speed.
 */
import fs from 'node:fs';
import os from 'node:os';

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
