/**
 * Pins written per second: through the JSON API (64 clients pinning into one open sample, as
 * the demo inspector), and a bare postgres.js baseline into the same `pin` table on the same
 * database (one INSERT per row; one loop, then 64 loops sharing a pool of 10 connections, the
 * app's pool size). The ratios say what the app's path (session, checks, transaction, zone and
 * regions) costs on top of storing the row.
 */
import { randomUUID } from 'node:crypto';
import postgres from 'postgres';
import { concurrently, cpuSecondsOfTree, defineBench, HttpSession, ms, percentile, type Cell } from './helpers';

const PINS = 4_000;
const CLIENTS = 64;
const WARM_UP = 256;
/** The app's pool (DATABASE_POOL_SIZE defaults to 10). */
const POOL = 10;
const UNITS = 500;
/** No phase runs longer than this; what it wrote by then is what it reports. */
const PHASE_LIMIT_MS = 120_000;
const INSPECTOR = { email: 'inspector@example.com', password: 'pin-the-defects' };
const WAIT_SAMPLE_MS = 25;
/** Requests of the read-only comparison: what a request costs the app before any write. */
const SESSION_ONLY = 2_000;

interface Ids {
	orgId: string;
	userId: string;
	partId: string;
	revisionId: string;
	defectTypeId: string;
}

interface Phase {
	label: string;
	attempted: number;
	ok: number;
	errors: Map<string, number>;
	firstError: string | null;
	seconds: number;
	latencies: number[];
	timedOut: boolean;
}

function newPhase(label: string): Phase {
	return {
		label,
		attempted: 0,
		ok: 0,
		errors: new Map(),
		firstError: null,
		seconds: 0,
		latencies: [],
		timedOut: false
	};
}

function fail(phase: Phase, kind: string, detail: string) {
	phase.errors.set(kind, (phase.errors.get(kind) ?? 0) + 1);
	phase.firstError ??= `${kind}: ${detail.slice(0, 300)}`;
}

/** Hands out `total` jobs to `workers` loops until done or out of time; times each job. */
async function drive(phase: Phase, total: number, workers: number, job: (i: number) => Promise<boolean>) {
	let next = 0;
	const deadline = Date.now() + PHASE_LIMIT_MS;
	const t0 = performance.now();
	await concurrently(workers, async () => {
		while (next < total) {
			if (Date.now() > deadline) {
				phase.timedOut = true;
				return;
			}
			const i = next++;
			phase.attempted++;
			const started = performance.now();
			if (await job(i)) phase.ok++;
			phase.latencies.push(performance.now() - started);
		}
	});
	phase.seconds = (performance.now() - t0) / 1000;
	phase.latencies.sort((a, b) => a - b);
}

const rate = (p: Phase) => (p.seconds > 0 ? p.ok / p.seconds : 0);

function row(p: Phase): Record<string, Cell> {
	return {
		run: p.label,
		pins: p.ok,
		errors: [...p.errors.values()].reduce((a, b) => a + b, 0),
		seconds: p.seconds.toFixed(2),
		'pins/s': Math.round(rate(p)),
		'p50 ms': ms(percentile(p.latencies, 0.5)),
		'p99 ms': ms(percentile(p.latencies, 0.99))
	};
}

function problems(p: Phase): string[] {
	const out: string[] = [];
	if (p.errors.size) {
		const kinds = [...p.errors].map(([k, n]) => `${n} × ${k}`).join(', ');
		out.push(`WARNING: ${p.label}: ${kinds}; first: ${p.firstError}`);
	}
	if (p.timedOut)
		out.push(`WARNING: ${p.label} stopped at the ${PHASE_LIMIT_MS / 1000} s limit after ${p.attempted} writes`);
	return out;
}

/** The demo inspector's view of the demo: FW-118, its newest front revision, a defect type. */
async function discover(session: HttpSession): Promise<Ids> {
	const me = await session.json<{ user: { id: string }; organization: { id: string } | null }>('GET', '/api/v1/me');
	if (!me.organization) throw new Error('The demo inspector has no organisation in this session.');
	const { parts } = await session.json<{ parts: { id: string; number: string }[] }>('GET', '/api/v1/parts?q=FW-118');
	const part = parts.find((p) => p.number === 'FW-118');
	if (!part) throw new Error('The demo part FW-118 is not there (was the demo seeded?).');
	const { views } = await session.json<{ views: { name: string; revisions: { id: string }[] }[] }>(
		'GET',
		`/api/v1/parts/${part.id}/views`
	);
	const revisionId = views[0]?.revisions[0]?.id;
	if (!revisionId) throw new Error('FW-118 has no drawing revision.');
	const { defectTypes } = await session.json<{ defectTypes: { id: string; severity: string }[] }>(
		'GET',
		'/api/v1/defect-types'
	);
	// A minor type: the demo plan wants photos of A and B defects before a sample closes.
	const defectTypeId = defectTypes.find((t) => t.severity === 'D')?.id;
	if (!defectTypeId) throw new Error('The demo catalogue has no defect type.');
	return { orgId: me.organization.id, userId: me.user.id, partId: part.id, revisionId, defectTypeId };
}

interface SampleAnswer {
	sample: { id: string; unitCount: number; state: string; pins: unknown[] };
}

async function startSample(session: HttpSession, partId: string, size: number) {
	const { sample } = await session.json<SampleAnswer>('POST', '/api/v1/samples', { partId, size }, [200, 201]);
	if (sample.unitCount !== size || sample.pins.length)
		throw new Error(
			`Expected a fresh sample of ${size} units, got ${sample.unitCount} units and ${sample.pins.length} pins.`
		);
	return sample.id;
}

/** Units in turn (every unit gets pins) or at random, as inspectors spread over a sample. */
const inTurn = (units: number) => (i: number) => (i % units) + 1;
const atRandom = (units: number) => (_i: number) => 1 + Math.floor(Math.random() * units);

/** 64 clients posting pins into one sample; a write counts when answered 201. */
async function apiPins(
	session: HttpSession,
	ids: Ids,
	phase: Phase,
	sampleId: string,
	total: number,
	unit: (i: number) => number
) {
	await drive(phase, total, CLIENTS, async (i) => {
		try {
			const res = await session.request('POST', `/api/v1/samples/${sampleId}/pins`, {
				id: randomUUID(),
				unitIndex: unit(i),
				revisionId: ids.revisionId,
				defectTypeId: ids.defectTypeId,
				x: Math.random(),
				y: Math.random(),
				note: ''
			});
			if (res.status === 201) return true;
			fail(phase, `HTTP ${res.status}`, res.body);
		} catch (e) {
			fail(phase, e instanceof Error ? e.name : 'error', e instanceof Error ? e.message : String(e));
		}
		return false;
	});
}

/** A sample for the bare rows (closed, so it does not count as the inspector's open one). */
async function bareSample(sql: postgres.Sql, ids: Ids): Promise<string> {
	const id = randomUUID();
	await sql`
		INSERT INTO sample (id, organization_id, part_id, inspector_id, size, unit_count, state, closed_at)
		VALUES (${id}, ${ids.orgId}, ${ids.partId}, ${ids.userId}, ${UNITS}, ${UNITS}, 'closed', now())`;
	return id;
}

/** One INSERT per row, each awaited, by `loops` loops sharing `sql`'s pool. */
async function bareInserts(sql: postgres.Sql, ids: Ids, phase: Phase, sampleId: string, total: number, loops: number) {
	const unit = atRandom(UNITS);
	await drive(phase, total, loops, async (i) => {
		try {
			await sql`
				INSERT INTO pin (id, organization_id, sample_id, unit_index, revision_id, defect_type_id, x, y, zone, regions, note, created_by)
				VALUES (${randomUUID()}, ${ids.orgId}, ${sampleId}, ${unit(i)}, ${ids.revisionId}, ${ids.defectTypeId},
					${Math.random()}, ${Math.random()}, ${'C3'}, '{}', ${''}, ${ids.userId})`;
			return true;
		} catch (e) {
			fail(phase, e instanceof Error ? e.name : 'error', e instanceof Error ? e.message : String(e));
			return false;
		}
	});
}

/** While `during` runs: what the app's database sessions are waiting on, sampled. */
async function sampleWaits(sql: postgres.Sql, during: Promise<void>) {
	const waits = new Map<string, number>();
	let samples = 0;
	let active = 0;
	let done = false;
	const watcher = (async () => {
		while (!done) {
			const rows = await sql<{ wait: string }[]>`
				SELECT CASE
					WHEN wait_event = 'ClientRead' OR state = 'idle in transaction' THEN 'waiting on the app'
					WHEN state = 'active' THEN coalesce(wait_event_type || ':' || wait_event, 'running a query')
					ELSE state END AS wait
				FROM pg_stat_activity WHERE application_name = 'stipple' AND state <> 'idle' AND pid <> pg_backend_pid()`;
			samples++;
			active += rows.length;
			for (const r of rows) waits.set(r.wait, (waits.get(r.wait) ?? 0) + 1);
			await new Promise((r) => setTimeout(r, WAIT_SAMPLE_MS));
		}
	})();
	try {
		await during;
	} finally {
		done = true;
		await watcher;
	}
	const seen = [...waits.values()].reduce((a, b) => a + b, 0);
	const top = [...waits]
		.sort((a, b) => b[1] - a[1])
		.slice(0, 6)
		.map(([w, n]) => {
			const pct = (100 * n) / Math.max(1, seen);
			return `${w} ${pct < 1 ? '<1' : Math.round(pct)}%`;
		})
		.join(', ');
	return `api: busy app connections ${(active / Math.max(1, samples)).toFixed(1)} of ${POOL} on average; what they were doing (${samples} samples): ${top || 'nothing seen'}`;
}

async function dbCounters(sql: postgres.Sql) {
	const [row] = await sql<{ commits: string; rollbacks: string; deadlocks: string }[]>`
		SELECT xact_commit AS commits, xact_rollback AS rollbacks, deadlocks
		FROM pg_stat_database WHERE datname = current_database()`;
	return { commits: Number(row!.commits), rollbacks: Number(row!.rollbacks), deadlocks: Number(row!.deadlocks) };
}

/** CPU used during a phase, as a share of one core; `app` undefined when the app took no part. */
function cpuLine(label: string, seconds: number, cpu: { app?: number | null; pg: number | null; client: number }) {
	const pct = (v: number | null) => (v === null ? '?' : `${Math.round((100 * v) / Math.max(seconds, 1e-9))}%`);
	const app = cpu.app === undefined ? '' : `app ${pct(cpu.app)}, `;
	return `${label}: CPU ${app}PostgreSQL ${pct(cpu.pg)}, bench client ${pct(cpu.client)} (100% = one core)`;
}

export default defineBench({
	title: `pins written per second (${PINS} pins each; API with ${CLIENTS} clients into one sample)`,
	async run(ctx) {
		const lines: string[] = [];
		const session = new HttpSession(ctx.url);
		await session.signIn(INSPECTOR.email, INSPECTOR.password);
		const ids = await discover(session);

		const sql = postgres(ctx.databaseUrl, {
			max: POOL,
			onnotice: () => {},
			connection: { application_name: 'stipple-bench' }
		});
		const watch = postgres(ctx.databaseUrl, {
			max: 1,
			onnotice: () => {},
			connection: { application_name: 'stipple-bench-watch' }
		});
		try {
			// Warm-up: the app's pool opens, its code paths get hot. Into a small sample of its own,
			// closed afterwards (one open sample per inspector per part), so the count check is exact.
			const warmSample = await startSample(session, ids.partId, 8);
			const warm = newPhase('api warm-up');
			await apiPins(session, ids, warm, warmSample, WARM_UP, inTurn(8));
			lines.push(...problems(warm));
			await session.json('POST', `/api/v1/samples/${warmSample}/close`);

			// (a) through the API
			const sampleId = await startSample(session, ids.partId, UNITS);
			const api = newPhase(`api (${CLIENTS} clients)`);
			const before = await dbCounters(watch);
			const cpu0 = { app: cpuSecondsOfTree(ctx.appPid), pg: cpuSecondsOfTree(ctx.postgresPid), me: process.cpuUsage() };
			const waits = await sampleWaits(watch, apiPins(session, ids, api, sampleId, PINS, atRandom(UNITS)));
			const cpu1 = {
				app: cpuSecondsOfTree(ctx.appPid),
				pg: cpuSecondsOfTree(ctx.postgresPid),
				me: process.cpuUsage(cpu0.me)
			};
			const after = await dbCounters(watch);

			// For comparison: a signed-in request that writes nothing (session, organisation, role).
			const meOnly = newPhase('api GET /api/v1/me');
			await drive(meOnly, SESSION_ONLY, CLIENTS, async () => {
				try {
					const res = await session.request('GET', '/api/v1/me');
					if (res.status === 200) return true;
					fail(meOnly, `HTTP ${res.status}`, res.body);
				} catch (e) {
					fail(meOnly, e instanceof Error ? e.name : 'error', e instanceof Error ? e.message : String(e));
				}
				return false;
			});
			lines.push(...problems(meOnly));

			// (b) the bare baseline, same table and database
			const warmBare = newPhase('bare warm-up');
			await bareInserts(sql, ids, warmBare, await bareSample(sql, ids), WARM_UP, CLIENTS);
			lines.push(...problems(warmBare));
			const one = newPhase('bare insert (1 loop)');
			await bareInserts(sql, ids, one, await bareSample(sql, ids), PINS, 1);
			const many = newPhase(`bare insert (${CLIENTS} loops)`);
			const cpu2 = { pg: cpuSecondsOfTree(ctx.postgresPid), me: process.cpuUsage() };
			await bareInserts(sql, ids, many, await bareSample(sql, ids), PINS, CLIENTS);
			const cpu3 = { pg: cpuSecondsOfTree(ctx.postgresPid), me: process.cpuUsage(cpu2.me) };

			const phases = [api, one, many];
			for (const p of phases) lines.push(...problems(p));
			const ratio = (base: Phase) => (rate(base) > 0 ? (rate(api) / rate(base)).toFixed(2) : '–');
			lines.push(`ratio: api / bare insert (${CLIENTS} loops) = ${ratio(many)}`);
			lines.push(`ratio: api / bare insert (1 loop) = ${ratio(one)}`);

			const [stored] = await watch<{ n: number }[]>`SELECT count(*)::int AS n FROM pin WHERE sample_id = ${sampleId}`;
			const check = `check: acknowledged ${api.ok}, stored ${stored!.n}`;
			lines.push(stored!.n === api.ok ? check : `WARNING: ${check} — they differ`);

			const sub = (a: number | null, b: number | null) => (a === null || b === null ? null : b - a);
			const commits = after.commits - before.commits;
			lines.push(
				`api: ${(commits / Math.max(1, api.attempted)).toFixed(1)} database transactions per request (${commits} commits, ` +
					`${after.rollbacks - before.rollbacks} rollbacks, ${after.deadlocks - before.deadlocks} deadlocks; includes the bench's own sampling)`
			);
			lines.push(waits);
			lines.push(
				`api: for comparison, GET /api/v1/me (signed-in, writes nothing) with ${CLIENTS} clients: ` +
					`${Math.round(rate(meOnly))} requests/s, p50 ${ms(percentile(meOnly.latencies, 0.5))} ms`
			);
			lines.push(
				cpuLine('api', api.seconds, {
					app: sub(cpu0.app, cpu1.app),
					pg: sub(cpu0.pg, cpu1.pg),
					client: (cpu1.me.user + cpu1.me.system) / 1e6
				}),
				cpuLine(`bare insert (${CLIENTS} loops)`, many.seconds, {
					pg: sub(cpu2.pg, cpu3.pg),
					client: (cpu3.me.user + cpu3.me.system) / 1e6
				})
			);
			return {
				columns: ['run', 'pins', 'errors', 'seconds', 'pins/s', 'p50 ms', 'p99 ms'],
				rows: phases.map(row),
				lines
			};
		} finally {
			await sql.end({ timeout: 5 });
			await watch.end({ timeout: 5 });
		}
	}
});
