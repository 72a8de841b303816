/**
 * Load and faults against the built app and a real PostgreSQL, on 127.0.0.1 only.
 *
 * 1. Load: 100 simulated inspectors (autocannon, one connection each) post samples and pins
 *    for STIPPLE_LOAD_SECONDS (10 in `npm test`, 60 in `npm run test:load`): no errors, and
 *    every acknowledged pin is in the database exactly once.
 * 2. Faults: the same load while the app is killed with SIGKILL three times (and started again)
 *    and PostgreSQL is crashed and restarted once. The inspectors send unanswered requests again
 *    with the same ids. Nothing acknowledged is lost or doubled, the app finds its database again
 *    by itself, and the event stream comes back after every fault.
 */
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type autocannon from 'autocannon';
import { signInCookie } from '../fixtures/sign-in';
import { EventWatch } from './events';
import { drive, newTally, SimulatedInspector, type Tally } from './inspectors';
import { startPlant, type Plant } from './plant';
import { audit } from './verify';

const SECONDS = Number(process.env.STIPPLE_LOAD_SECONDS ?? 10);
const INSPECTORS = 100;

let plant: Plant;
let engineerCookie: string;

beforeAll(async () => {
	plant = await startPlant('load');
	engineerCookie = await signInCookie(plant.apps[0]!.url, 'engineer@example.com');
}, 180_000);

afterAll(async () => {
	await plant?.stop();
}, 60_000);

async function inspectors(group: string, tally: Tally) {
	const accounts = await plant.addInspectors(group, INSPECTORS);
	return accounts.map((a) => new SimulatedInspector(a.email, a.cookie, plant.workpiece, tally));
}

/** The database against the acknowledgements: every acknowledged pin once, nothing stray or doubled. */
async function storedOnce(tally: Tally, group: string) {
	const found = await audit(plant.sql, tally, group);
	expect(found).toMatchObject({
		ackedStored: tally.acked.size,
		stray: 0,
		doubled: 0,
		straySamples: 0,
		closedWrong: 0,
		doubleOpen: 0
	});
	return found;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Nearest-rank percentile. */
function percentile(values: number[], q: number) {
	const sorted = [...values].sort((a, b) => a - b);
	return sorted.length ? sorted[Math.max(0, Math.ceil(q * sorted.length) - 1)]! : NaN;
}

/**
 * The run's figures. autocannon's own latency is printed for the steady run only: when a
 * connection dies it times the resent request from the lost one's start.
 */
function report(label: string, result: autocannon.Result, tally: Tally, seconds: number) {
	const l = result.latency;
	const closed = [...tally.samples.values()].filter((s) => s.closed).length;
	console.log(
		[
			`${label}: ${INSPECTORS} inspectors, ${seconds.toFixed(1)} s`,
			`  requests ${result.requests.total}: 2xx ${result['2xx']}, non-2xx ${result.non2xx}, connection errors ${result.errors}, timeouts ${result.timeouts}; sent again after ${[...tally.retriedAfter].map(([k, v]) => `${v} × ${k}`).join(', ') || 'no 5xx'}`,
			`  pins acknowledged ${tally.acked.size} (${Math.round(tally.acked.size / seconds)}/s; ${tally.replayed} of them retries of pins already stored); samples closed ${closed}`,
			...(result.errors ? [] : [`  autocannon latency ms: p50 ${l.p50}, p99 ${l.p99}, max ${l.max}`]),
			`  first send to acknowledgement, retries included, ms: p50 ${percentile(tally.toAck, 0.5)}, p99 ${percentile(tally.toAck, 0.99)}`
		].join('\n')
	);
}

describe('under load', () => {
	test(
		`${INSPECTORS} inspectors for ${SECONDS} s: no errors, every acknowledged pin stored once`,
		async () => {
			const tally = newTally();
			const crowd = await inspectors('steady', tally);
			const t0 = performance.now();
			// SECONDS at least, and on a slow machine on until some samples have closed (60 s more at most).
			const closedOne = () => [...tally.samples.values()].some((s) => s.closed);
			const enough = (async () => {
				await sleep(SECONDS * 1000);
				for (let waited = 0; !closedOne() && waited < 60_000; waited += 100) await sleep(100);
			})();
			const result = await drive(plant.apps[0]!.url, crowd, { seconds: SECONDS, until: enough });
			report('load', result, tally, (performance.now() - t0) / 1000);

			expect(tally.unexpected).toEqual([]);
			expect({ errors: result.errors, timeouts: result.timeouts, non2xx: result.non2xx }).toEqual({
				errors: 0,
				timeouts: 0,
				non2xx: 0
			});
			expect(tally.acked.size).toBeGreaterThan(INSPECTORS);
			const found = await storedOnce(tally, 'steady');
			expect(found.closed).toBeGreaterThan(0);
			// In flight when the run stopped: at most one pin per inspector.
			expect(found.storedUnacked).toBeLessThanOrEqual(INSPECTORS);
		},
		180_000 + SECONDS * 1000
	);

	test(
		'SIGKILL ×3 and a PostgreSQL crash during the load: nothing lost or doubled, reconnects, events resume',
		async () => {
			const app = plant.apps[0]!;
			const tally = newTally();
			const crowd = await inspectors('faulty', tally);
			const watch = new EventWatch(() => app.url, engineerCookie);
			watch.start();
			const gap = (SECONDS * 1000) / 5;
			const faults: { what: string; at: number; back: number }[] = [];
			let pidThroughDatabaseRestart: [number | null, number | null] = [null, null];

			// Before the next fault, the app shows it is back: pins acknowledged, the stream open again
			// and a closed sample seen on it (waited for, up to 30 s, so a slow machine is not a
			// failure); then the load runs on for a while.
			const recovered = (since: number, fault: string) =>
				tally.ackTimes.some((t) => t > since) &&
				watch.opened.some((t) => t > since) &&
				watch.seen('sample.closed', since).length > 0 &&
				(fault !== 'database' || watch.seen('resync', since).length > 0);
			const settle = async (since: number, fault: string) => {
				for (let waited = 0; !recovered(since, fault) && waited < 30_000; waited += 100) await sleep(100);
				await sleep(gap);
			};

			const script = (async () => {
				await sleep(gap);
				for (let i = 1; i <= 3; i++) {
					const at = Date.now();
					await app.kill('SIGKILL');
					await app.start();
					faults.push({ what: `app SIGKILL ${i}`, at, back: Date.now() });
					await settle(at, 'app');
				}
				const at = Date.now();
				const pid = app.pid;
				await plant.restartDatabase();
				faults.push({ what: 'PostgreSQL crash and restart', at, back: Date.now() });
				pidThroughDatabaseRestart = [pid, app.pid];
				// The app listens again within seconds (its heartbeat notices the lost connection).
				await settle(at, 'database');
			})();

			const t0 = performance.now();
			const result = await drive(app.url, crowd, { seconds: SECONDS, until: script });
			await script;
			const seconds = (performance.now() - t0) / 1000;
			// Let the last events arrive before looking at them.
			await sleep(500);
			await watch.stop();
			report('faults', result, tally, seconds);
			for (const f of faults) console.log(`  ${f.what}: answered again after ${f.back - f.at} ms`);
			const resyncAt = watch.seen('resync', faults[3]?.at ?? Infinity)[0]?.at;
			if (resyncAt) console.log(`  the open event stream said "resync" ${resyncAt - faults[3]!.at} ms after the crash`);

			expect(faults.map((f) => f.what)).toEqual([
				'app SIGKILL 1',
				'app SIGKILL 2',
				'app SIGKILL 3',
				'PostgreSQL crash and restart'
			]);
			expect(tally.unexpected).toEqual([]);
			// While the database restarted, requests were told 503 (try again), never a bare 500.
			expect([...tally.retriedAfter.keys()].filter((s) => s !== 503)).toEqual([]);
			await storedOnce(tally, 'faulty');

			// The app found its database again by itself: same process, acknowledgements after.
			const [before, after] = pidThroughDatabaseRestart;
			expect(before).not.toBeNull();
			expect(after).toBe(before);
			const dbFault = faults[3]!;
			expect(tally.ackTimes.filter((t) => t > dbFault.back).length).toBeGreaterThan(0);

			// After every fault, pins were acknowledged again and closed samples reached the stream.
			faults.forEach((f, i) => {
				const until = faults[i + 1]?.at ?? Infinity;
				expect(tally.ackTimes.filter((t) => t > f.back && t < until).length, f.what).toBeGreaterThan(0);
				expect(watch.seen('sample.closed', f.back, until).length, f.what).toBeGreaterThan(0);
			});
			// Each SIGKILL ended the stream and the watcher opened a new one; the database restart
			// did not end it: the same stream said "resync" and went on.
			faults.slice(0, 3).forEach((f, i) => {
				const until = faults[i + 1]!.at;
				expect(
					watch.opened.some((t) => t > f.at && t < until),
					f.what
				).toBe(true);
			});
			const streamBeforeDb = watch.opened.filter((t) => t < dbFault.at).length;
			const resync = watch.seen('resync', dbFault.at);
			expect(resync.length).toBeGreaterThan(0);
			expect(resync[0]!.connection).toBe(streamBeforeDb);
		},
		240_000 + SECONDS * 2000
	);
});
