/**
 * The Bench canvas with 5,000 pins, in Debian's headless Chromium: how long from navigation until
 * the pins are on screen, and how long frames take while the inspector pans the zoomed drawing.
 * The baseline is a bare page (bare-canvas.html) that draws the same drawing and the same markers
 * at the same positions and size on a konva Stage of the same size, with one Shape and a Path2D
 * per marker shape, and pans it with the same arithmetic and the same mouse moves. The ratios say
 * what the Bench (SvelteKit, Svelte's reactive state, the page around the canvas) costs on top.
 */
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import type { BrowserContext, Page } from '@playwright/test';
import postgres from 'postgres';
import { MARKER_COLOURS, shapePath } from '../../src/lib/markers';
import { zoneOf } from '../../src/lib/spatial/zones';
import {
	defineBench,
	deleteSample,
	demoRows,
	insertSample,
	launchChromium,
	ms,
	newContext,
	percentile,
	signInContext,
	type Cell,
	type Demo,
	type SeededPin
} from './helpers';

const PINS = 5_000;
const INSPECTOR = 'inspector@example.com';
/** A sample of the demo plan's size; units 2–5 are marked clean so the Bench opens on unit 1. */
const UNITS = 5;
const VIEWPORT = { width: 1280, height: 800 };
/** Page loads of each page; the first is cold (empty cache), the rest warm. */
const LOADS = 5;
/** Pans of each page, taking turns; one goes out along a circle, the next comes back. */
const PANS = 4;
const MOVES = 240;
const MOVE_EVERY_MS = 16;
const RADIUS = 120;
/** Frames slower than this count as janky. */
const JANK_MS = 50;
/** BenchCanvas.svelte: a press this close (px) to a marker picks the pin up instead of panning. */
const REACH = 22;
/** BenchCanvas.svelte: the zoom buttons' factor. */
const ZOOM_STEP = 1.5;
const root = path.resolve(import.meta.dirname, '../..');

/** A small seeded generator (mulberry32), so every run pins the same places. */
function random(seed: number) {
	return () => {
		seed = (seed + 0x6d2b79f5) | 0;
		let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
		t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

/**
 * 5,000 pins over the whole Front view, all on unit 1, of every type the part has, the first
 * types more often than the last (as real defect counts are skewed).
 */
function spreadPins(demo: Demo): SeededPin[] {
	const next = random(118);
	const weights = demo.types.map((_, i) => 1 / (i + 1));
	const total = weights.reduce((a, b) => a + b, 0);
	const pickType = () => {
		let r = next() * total;
		for (const [i, w] of weights.entries()) if ((r -= w) < 0) return demo.types[i]!;
		return demo.types.at(-1)!;
	};
	const { gridColumns: columns, gridRows: rows } = demo.front;
	return Array.from({ length: PINS }, () => {
		const x = 0.02 + 0.96 * next();
		const y = 0.02 + 0.96 * next();
		return {
			unitIndex: 1,
			defectTypeId: pickType().id,
			x,
			y,
			zone: columns && rows ? zoneOf([x, y], columns, rows).label : null
		};
	});
}

interface Box {
	left: number;
	top: number;
	width: number;
	height: number;
}

/** What the page records about itself (the init script and the frame recorder write it). */
interface Probe {
	__paint?: { seen: number; painted: number };
	__longTasks: number[];
	__frames: number[];
	__recording: boolean;
	__downAt?: number;
	__upAt?: number;
	__moves: number;
}

/**
 * Runs in every document before its own scripts: from the first frame on, looks each frame for
 * the canvas with all pins and its drawing ready, then waits two more frames (konva draws in the
 * frame after the change) and notes the time since navigation start. Also collects long tasks.
 */
function paintProbe(pins: number) {
	const w = window as unknown as Probe;
	w.__longTasks = [];
	try {
		new PerformanceObserver((list) => {
			for (const e of list.getEntries()) w.__longTasks.push(e.duration);
		}).observe({ type: 'longtask', buffered: true });
	} catch {
		// no long task timing in this browser
	}
	const look = () => {
		const el = document.querySelector<HTMLElement>('[data-testid=bench-canvas]');
		if (el?.dataset.ready === 'yes' && el.dataset.pins === String(pins)) {
			const seen = performance.now();
			requestAnimationFrame(() => requestAnimationFrame(() => (w.__paint = { seen, painted: performance.now() })));
		} else requestAnimationFrame(look);
	};
	requestAnimationFrame(look);
}

interface Load {
	painted: number;
	seen: number;
	domContentLoaded: number;
	htmlKB: number;
	longTaskMs: number;
	longestTask: number;
}

async function loadOnce(page: Page, url: string): Promise<Load> {
	await page.goto(url, { waitUntil: 'commit' });
	await page.waitForFunction(() => (window as unknown as Probe).__paint !== undefined, null, {
		timeout: 120_000,
		polling: 50
	});
	return page.evaluate(() => {
		const w = window as unknown as Probe;
		const nav = performance.getEntriesByType('navigation')[0] as PerformanceNavigationTiming | undefined;
		return {
			painted: w.__paint!.painted,
			seen: w.__paint!.seen,
			domContentLoaded: nav?.domContentLoadedEventEnd ?? 0,
			htmlKB: (nav?.decodedBodySize ?? 0) / 1024,
			longTaskMs: w.__longTasks.reduce((a, b) => a + b, 0),
			longestTask: Math.max(0, ...w.__longTasks)
		};
	});
}

async function boxOf(page: Page): Promise<Box> {
	return page.getByTestId('bench-canvas').evaluate((el) => {
		const r = el.getBoundingClientRect();
		return { left: r.left, top: r.top, width: r.width, height: r.height };
	});
}

/** The drawing's place on the canvas, as BenchCanvas.svelte (and the bare page) work it out. */
class View {
	readonly W: number;
	readonly H: number;
	zoom = 1;
	pan = { x: 0, y: 0 };

	constructor(
		readonly box: Box,
		drawing: { width: number; height: number }
	) {
		const fit = Math.min(box.width / drawing.width, box.height / drawing.height);
		this.W = drawing.width * fit;
		this.H = drawing.height * fit;
	}

	bounded(p: { x: number; y: number }, z: number) {
		const { width, height } = this.box;
		const minX = Math.min(0, width - this.W * z);
		const minY = Math.min(0, height - this.H * z);
		return {
			x: Math.min(Math.max(p.x, minX), Math.max(0, width - this.W * z)),
			y: Math.min(Math.max(p.y, minY), Math.max(0, height - this.H * z))
		};
	}

	zoomIn() {
		const point = { x: this.box.width / 2, y: this.box.height / 2 };
		const next = Math.min(8, this.zoom * ZOOM_STEP);
		const k = next / this.zoom;
		this.pan = this.bounded({ x: point.x - (point.x - this.pan.x) * k, y: point.y - (point.y - this.pan.y) * k }, next);
		this.zoom = next;
	}

	/** Pans by (dx, dy); false when the drawing's edge would stop it (the pan would not be the same). */
	panBy(dx: number, dy: number) {
		const want = { x: this.pan.x + dx, y: this.pan.y + dy };
		const got = this.bounded(want, this.zoom);
		this.pan = got;
		return Math.abs(got.x - want.x) < 0.01 && Math.abs(got.y - want.y) < 0.01;
	}

	/** Where a pin is on screen, relative to the canvas's top left. */
	screen(x: number, y: number) {
		return { x: x * this.W * this.zoom + this.pan.x, y: y * this.H * this.zoom + this.pan.y };
	}
}

/** The moves of one pan, relative to where it starts: along a circle, ending (−R, −R) or (+R, +R) away. */
function panPath(direction: 1 | -1) {
	return Array.from({ length: MOVES }, (_, i) => {
		const a = (1.75 * 2 * Math.PI * (i + 1)) / MOVES;
		return { dx: direction * RADIUS * (Math.cos(a) - 1), dy: direction * RADIUS * Math.sin(a) };
	});
}

/** Whether a press at a canvas point would pan: no marker within BenchCanvas's reach of it. */
function panWouldStart(view: View, pins: SeededPin[]) {
	const cell = REACH * 2;
	const grid = new Map<string, { x: number; y: number }[]>();
	for (const p of pins) {
		const s = view.screen(p.x, p.y);
		const key = `${Math.floor(s.x / cell)},${Math.floor(s.y / cell)}`;
		grid.set(key, [...(grid.get(key) ?? []), s]);
	}
	return (x: number, y: number) => {
		const [cx, cy] = [Math.floor(x / cell), Math.floor(y / cell)];
		for (let i = cx - 1; i <= cx + 1; i++)
			for (let j = cy - 1; j <= cy + 1; j++)
				for (const s of grid.get(`${i},${j}`) ?? []) if (Math.hypot(s.x - x, s.y - y) < REACH + 3) return false;
		return true;
	};
}

/** The share of the canvas where a press pans (everywhere else it picks up a pin). */
function panShare(view: View, pins: SeededPin[]) {
	const clear = panWouldStart(view, pins);
	let yes = 0;
	let all = 0;
	for (let x = 2; x < view.box.width; x += 4)
		for (let y = 2; y < view.box.height; y += 4) {
			all++;
			if (clear(x, y)) yes++;
		}
	return yes / Math.max(1, all);
}

/**
 * A place to press where no marker is within reach (so the press pans rather than picks up a
 * pin), with room for the whole path inside the canvas and away from the zoom buttons; the
 * nearest such place to the middle.
 */
function pressPoint(view: View, pins: SeededPin[], direction: 1 | -1) {
	const { width, height } = view.box;
	const clear = panWouldStart(view, pins);
	const margin = 12;
	const [xMin, xMax] = direction === 1 ? [2 * RADIUS + margin, width - margin] : [margin, width - 2 * RADIUS - margin];
	const [yMin, yMax] = [RADIUS + margin, height - RADIUS - margin - 70];
	const candidates: { x: number; y: number; d: number }[] = [];
	for (let x = xMin; x <= xMax; x += 2)
		for (let y = yMin; y <= yMax; y += 2) candidates.push({ x, y, d: Math.hypot(x - width / 2, y - height / 2) });
	candidates.sort((a, b) => a.d - b.d);
	return candidates.find((c) => clear(c.x, c.y)) ?? null;
}

interface Pan {
	/** Intervals between frames from the press to the release, ms. */
	intervals: number[];
	/** Main-thread time (Chromium's TaskDuration) during the pan, ms. */
	busyMs: number;
	scriptMs: number;
	seconds: number;
	movesSeen: number;
	writes: number;
	moved: boolean;
}

async function metrics(cdp: Awaited<ReturnType<BrowserContext['newCDPSession']>>) {
	const { metrics } = (await cdp.send('Performance.getMetrics')) as { metrics: { name: string; value: number }[] };
	const of = (name: string) => metrics.find((m) => m.name === name)?.value ?? 0;
	return { task: of('TaskDuration') * 1000, script: of('ScriptDuration') * 1000 };
}

async function panOnce(page: Page, view: View, pins: SeededPin[], direction: 1 | -1): Promise<Pan> {
	const start = pressPoint(view, pins, direction);
	if (!start) throw new Error('No place on the canvas to press without picking up a pin: the pan cannot start.');
	const path = panPath(direction);
	const end = path.at(-1)!;
	if (!view.panBy(end.dx, end.dy)) throw new Error('The pan would run into the drawing’s edge.');

	const canvas = page.getByTestId('bench-canvas');
	const before = await canvas.screenshot();
	let writes = 0;
	// A press that picked up a pin would move it and send the move: the pan must send nothing.
	const count = (r: { method(): string }) => {
		if (r.method() !== 'GET') writes++;
	};
	page.on('request', count);
	const cdp = await page.context().newCDPSession(page);
	await cdp.send('Performance.enable');
	await page.evaluate(() => {
		const w = window as unknown as Probe;
		Object.assign(w, { __frames: [], __recording: true, __moves: 0, __downAt: undefined, __upAt: undefined });
		addEventListener('pointerdown', (e) => (w.__downAt = e.timeStamp), { capture: true, once: true });
		addEventListener('pointerup', (e) => (w.__upAt = e.timeStamp), { capture: true, once: true });
		addEventListener('pointermove', () => w.__moves++, { capture: true });
		const tick = (t: number) => {
			w.__frames.push(t);
			if (w.__recording) requestAnimationFrame(tick);
		};
		requestAnimationFrame(tick);
	});

	const { left, top } = view.box;
	const m0 = await metrics(cdp);
	const t0 = performance.now();
	await page.mouse.move(left + start.x, top + start.y);
	await page.mouse.down();
	// Sent on a clock like a real mouse, not each after the last was handled: awaiting each move
	// would wait for the page to finish its frame, so the page would never have input queued.
	const sent: Promise<void>[] = [];
	for (const [i, { dx, dy }] of path.entries()) {
		const wait = t0 + (i + 1) * MOVE_EVERY_MS - performance.now();
		if (wait > 0) await new Promise((r) => setTimeout(r, wait));
		sent.push(page.mouse.move(left + start.x + dx, top + start.y + dy));
	}
	await Promise.all(sent);
	await page.mouse.up();
	const seconds = (performance.now() - t0) / 1000;
	// Two more frames, so the last move is drawn before the recorder stops.
	await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
	const m1 = await metrics(cdp);
	const seen = await page.evaluate(() => {
		const w = window as unknown as Probe;
		w.__recording = false;
		return { frames: w.__frames, downAt: w.__downAt ?? 0, upAt: w.__upAt ?? Infinity, moves: w.__moves };
	});
	await cdp.detach();
	page.off('request', count);
	const after = await canvas.screenshot();

	const frames = seen.frames.filter((t) => t >= seen.downAt && t <= seen.upAt + 20);
	const intervals = frames.slice(1).map((t, i) => t - frames[i]!);
	return {
		intervals,
		busyMs: m1.task - m0.task,
		scriptMs: m1.script - m0.script,
		seconds,
		movesSeen: seen.moves,
		writes,
		moved: !before.equals(after)
	};
}

/** The bare page, konva and the drawing, from 127.0.0.1 like the app. */
async function bareServer(config: unknown, drawing: Buffer) {
	const html = fs
		.readFileSync(path.join(import.meta.dirname, 'bare-canvas.html'), 'utf8')
		.replace('/*CONFIG*/ null', () => JSON.stringify(config));
	const konva = fs.readFileSync(path.join(root, 'node_modules/konva/konva.min.js'));
	const server = http.createServer((req, res) => {
		const [type, body, cache] =
			req.url === '/'
				? ['text/html; charset=utf-8', html, 'no-store']
				: req.url === '/konva.min.js'
					? ['text/javascript', konva, 'max-age=3600']
					: req.url === '/drawing.webp'
						? ['image/webp', drawing, 'max-age=3600']
						: [null, null, null];
		if (!type) {
			res.writeHead(404).end();
			return;
		}
		res.writeHead(200, { 'content-type': type, 'cache-control': cache }).end(body);
	});
	await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
	const { port } = server.address() as AddressInfo;
	return {
		url: `http://127.0.0.1:${port}/`,
		close: () => new Promise<void>((resolve) => server.close(() => resolve()))
	};
}

const median = (v: number[]) =>
	percentile(
		[...v].sort((a, b) => a - b),
		0.5
	);

interface Target {
	label: string;
	page: Page;
	url: string;
	loads: Load[];
	pans: Pan[];
	view?: View;
}

function row(t: Target): Record<string, Cell> {
	const paints = t.loads.map((l) => l.painted);
	const intervals = t.pans.flatMap((p) => p.intervals).sort((a, b) => a - b);
	const busy = t.pans.reduce((a, p) => a + p.busyMs, 0);
	return {
		page: t.label,
		'first paint ms': ms(median(paints)),
		cold: ms(paints[0] ?? null),
		'warm min': ms(Math.min(...paints.slice(1))),
		'warm max': ms(Math.max(...paints.slice(1))),
		frames: intervals.length,
		'median ms': ms(percentile(intervals, 0.5)),
		'p95 ms': ms(percentile(intervals, 0.95)),
		'max ms': ms(intervals.at(-1) ?? null),
		[`>${JANK_MS} ms`]: intervals.filter((d) => d > JANK_MS).length,
		'busy ms/frame': ms(intervals.length ? busy / intervals.length : null)
	};
}

export default defineBench({
	title: `the Bench canvas with ${PINS} pins in headless Chromium: first paint and panning, against bare konva`,
	async run(ctx) {
		const lines: string[] = [];
		const sql = postgres(ctx.databaseUrl, { max: 2, onnotice: () => {} });
		const browser = await launchChromium();
		let sampleId: string | undefined;
		let bare: Awaited<ReturnType<typeof bareServer>> | undefined;
		try {
			const demo = await demoRows(sql);
			const pins = spreadPins(demo);
			sampleId = await insertSample(sql, demo, INSPECTOR, {
				units: UNITS,
				clean: Array.from({ length: UNITS - 1 }, (_, i) => i + 2),
				pins
			});

			const benchContext = await newContext(browser, { viewport: VIEWPORT, deviceScaleFactor: 1 });
			await signInContext(benchContext, ctx.url, INSPECTOR);
			await benchContext.addInitScript(paintProbe, PINS);
			const bench: Target = {
				label: 'Bench page',
				page: await benchContext.newPage(),
				url: `${ctx.url}/bench/${sampleId}`,
				loads: [],
				pans: []
			};
			// The first load tells the canvas's size, which the bare page copies.
			bench.loads.push(await loadOnce(bench.page, bench.url));
			const box = await boxOf(bench.page);
			const drawingRes = await benchContext.request.get(
				`${ctx.url}/api/v1/revisions/${demo.front.revisionId}/display.webp`
			);
			if (!drawingRes.ok()) throw new Error(`The drawing answered ${drawingRes.status()}.`);
			const typeIndex = new Map(demo.types.map((t, i) => [t.id, i]));
			bare = await bareServer(
				{
					box,
					view: { width: demo.front.width, height: demo.front.height },
					types: demo.types.map((t) => ({ path: shapePath(t.shape), hex: MARKER_COLOURS[t.colour].hex })),
					pins: pins.flatMap((p) => [p.x, p.y, typeIndex.get(p.defectTypeId)!])
				},
				await drawingRes.body()
			);
			const bareContext = await newContext(browser, { viewport: VIEWPORT, deviceScaleFactor: 1 });
			await bareContext.addInitScript(paintProbe, PINS);
			const baseline: Target = {
				label: 'bare konva page',
				page: await bareContext.newPage(),
				url: bare.url,
				loads: [],
				pans: []
			};
			baseline.loads.push(await loadOnce(baseline.page, baseline.url));

			// Taking turns, so a slow moment of the machine falls on both.
			for (let i = 1; i < LOADS; i++) for (const t of [bench, baseline]) t.loads.push(await loadOnce(t.page, t.url));

			const fitted = new View(box, demo.front);
			const shareAtFit = panShare(fitted, pins);
			for (const t of [bench, baseline]) {
				const canvas = t.page.getByTestId('bench-canvas');
				if ((await boxOf(t.page)).width !== box.width)
					lines.push(`WARNING: ${t.label}: the canvas is not ${box.width} px wide`);
				t.view = new View(box, demo.front);
				for (const expect of ['1.50', '2.25']) {
					await t.page.getByRole('button', { name: 'Zoom in' }).click();
					await canvas.and(t.page.locator(`[data-zoom="${expect}"]`)).waitFor({ timeout: 10_000 });
					t.view.zoomIn();
				}
				await t.page.waitForTimeout(300);
			}
			const shareZoomed = panShare(bench.view!, pins);
			for (let i = 0; i < PANS; i++)
				for (const t of [bench, baseline]) t.pans.push(await panOnce(t.page, t.view!, pins, i % 2 ? -1 : 1));

			const targets = [bench, baseline];
			for (const t of targets) {
				const l = t.loads;
				const pans = t.pans;
				lines.push(
					`${t.label}: loads (ms from navigation start to pins painted) ${l.map((x) => x.painted.toFixed(0)).join(', ')}; ` +
						`document ${l[0]!.htmlKB.toFixed(0)} KB, DOMContentLoaded median ${ms(median(l.map((x) => x.domContentLoaded)))} ms, ` +
						`canvas ready → painted median ${ms(median(l.map((x) => x.painted - x.seen)))} ms, ` +
						`long tasks per load median ${ms(median(l.map((x) => x.longTaskMs)))} ms (longest ${ms(Math.max(...l.map((x) => x.longestTask)))} ms)`
				);
				const moves = pans.reduce((a, p) => a + p.movesSeen, 0);
				const secs = pans.reduce((a, p) => a + p.seconds, 0);
				lines.push(
					`${t.label}: ${pans.length} pans of ${MOVES} mouse moves every ${MOVE_EVERY_MS} ms (${secs.toFixed(1)} s in all); ` +
						`the page saw ${moves} pointermoves; main thread busy ${(pans.reduce((a, p) => a + p.busyMs, 0) / secs / 10).toFixed(0)}% ` +
						`of the pan (script ${(pans.reduce((a, p) => a + p.scriptMs, 0) / secs / 10).toFixed(0)}%)`
				);
				if (pans.some((p) => !p.moved)) lines.push(`WARNING: ${t.label}: a pan left the canvas unchanged`);
				if (pans.some((p) => p.writes))
					lines.push(
						`WARNING: ${t.label}: a pan sent ${pans.reduce((a, p) => a + p.writes, 0)} writes (a pin was dragged?)`
					);
			}

			const ratio = (label: string, a: number | null, b: number | null) =>
				`ratio: ${label} Bench / bare = ${a !== null && b !== null && b > 0 ? (a / b).toFixed(2) : '–'}`;
			const sorted = (t: Target) => t.pans.flatMap((p) => p.intervals).sort((a, b) => a - b);
			const busyPerFrame = (t: Target) => t.pans.reduce((a, p) => a + p.busyMs, 0) / Math.max(1, sorted(t).length);
			lines.push(
				ratio(
					'first paint (median of loads)',
					median(bench.loads.map((l) => l.painted)),
					median(baseline.loads.map((l) => l.painted))
				),
				ratio('pan frame time median', percentile(sorted(bench), 0.5), percentile(sorted(baseline), 0.5)),
				ratio('pan frame time p95', percentile(sorted(bench), 0.95), percentile(sorted(baseline), 0.95)),
				ratio('pan main-thread ms per frame', busyPerFrame(bench), busyPerFrame(baseline))
			);
			lines.push(
				`canvas ${box.width.toFixed(0)} × ${box.height.toFixed(0)} px in a ${VIEWPORT.width} × ${VIEWPORT.height} viewport at zoom 2.25, ` +
					`${PINS} pins of ${demo.types.length} types on unit 1 of the Front view; presses start where no pin is within ${REACH} px, the same path on both pages ` +
					`(${(100 * shareAtFit).toFixed(1)}% of the canvas at zoom 1, ${(100 * shareZoomed).toFixed(1)}% at zoom 2.25; the Bench drags only a selected pin)`,
				'note: headless Chromium with --disable-gpu draws the canvas in software and paces frames itself; frame times are approximate, ' +
					'the main-thread figures (Chromium TaskDuration) are the steadier comparison'
			);
			return {
				columns: Object.keys(row(bench)),
				rows: targets.map(row),
				lines
			};
		} finally {
			await browser.close();
			await bare?.close();
			if (sampleId) await deleteSample(sql, sampleId);
			await sql.end({ timeout: 5 });
		}
	}
});
