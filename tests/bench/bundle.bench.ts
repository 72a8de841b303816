/**
 * The JavaScript each main page makes the browser load: every script response until the network
 * is idle (the entry, the layouts' and the page's chunks, and what they import later, such as
 * the Bench's konva canvas), each body compressed with gzip at level 9 and summed. Every page
 * opens in a fresh browser context (empty cache), signed in as the demo admin; the sign-in page,
 * signed out, is the baseline. A page that answers 404 is left out.
 */
import zlib from 'node:zlib';
import type { Browser, BrowserContext, Response } from '@playwright/test';
import postgres from 'postgres';
import {
	defineBench,
	deleteSample,
	demoRows,
	launchChromium,
	insertSample,
	newContext,
	signInContext,
	type Cell
} from './helpers';

const ADMIN = 'admin@example.com';
const PAGES = [
	'/',
	'/bench',
	'/bench/{sample}',
	'/setup',
	'/setup/parts',
	'/trends',
	'/signals',
	'/hotspots',
	'/repairs',
	'/team'
];
const KB = 1024;

interface Script {
	url: string;
	raw: number;
	gzip: number;
}

interface Measured {
	page: string;
	status: number;
	scripts: Script[];
}

const isScript = (res: Response) =>
	res.request().resourceType() === 'script' || new URL(res.url()).pathname.endsWith('.js');

async function measure(
	browser: Browser,
	base: string,
	page: string,
	path: string,
	storageState?: Awaited<ReturnType<BrowserContext['storageState']>>
): Promise<Measured> {
	const context = await newContext(browser, { viewport: { width: 1280, height: 800 }, storageState });
	try {
		const tab = await context.newPage();
		const bodies = new Map<string, Promise<Script | null>>();
		tab.on('response', (res) => {
			if (!isScript(res) || bodies.has(res.url()) || res.status() !== 200) return;
			bodies.set(
				res.url(),
				res.body().then(
					(body) => ({ url: res.url(), raw: body.length, gzip: zlib.gzipSync(body, { level: 9 }).length }),
					() => null
				)
			);
		});
		const res = await tab.goto(`${base}${path}`, { waitUntil: 'networkidle', timeout: 60_000 });
		const scripts = (await Promise.all(bodies.values())).filter((s): s is Script => s !== null);
		return { page, status: res?.status() ?? 0, scripts };
	} finally {
		await context.close();
	}
}

const total = (m: Measured, key: 'raw' | 'gzip') => m.scripts.reduce((a, s) => a + s[key], 0);

function row(m: Measured): Record<string, Cell> {
	return {
		page: m.page,
		status: m.status,
		files: m.scripts.length,
		'raw KB': (total(m, 'raw') / KB).toFixed(1),
		'gzip KB': (total(m, 'gzip') / KB).toFixed(1)
	};
}

const fileName = (url: string) => new URL(url).pathname.split('/').pop() ?? url;

export default defineBench({
	title: 'JavaScript per page (every script until network idle, gzip -9), signed in as the demo admin',
	async run(ctx) {
		const lines: string[] = [];
		const sql = postgres(ctx.databaseUrl, { max: 1, onnotice: () => {} });
		const browser = await launchChromium();
		let sampleId: string | undefined;
		try {
			// A sample for /bench/{id}: its script does not depend on how many pins it has.
			sampleId = await insertSample(sql, await demoRows(sql), ADMIN, { units: 5 });
			const signedIn = await newContext(browser);
			await signInContext(signedIn, ctx.url, ADMIN);
			const storageState = await signedIn.storageState();
			await signedIn.close();

			const signInPage = await measure(browser, ctx.url, '/sign-in (signed out)', '/sign-in');
			const measured: Measured[] = [signInPage];
			for (const page of PAGES) {
				const m = await measure(browser, ctx.url, page, page.replace('{sample}', sampleId), storageState);
				if (m.status === 404) lines.push(`skipped ${page}: 404`);
				else measured.push(m);
			}
			for (const m of measured)
				if (m.status !== 200) lines.push(`WARNING: ${m.page} answered ${m.status}`);
				else if (!m.scripts.length) lines.push(`WARNING: ${m.page} loaded no JavaScript`);

			const bench = measured.find((m) => m.page === '/bench/{sample}');
			const smallest = measured.reduce((a, b) => (total(b, 'gzip') < total(a, 'gzip') ? b : a));
			if (bench) {
				const ratio = (base: Measured) => (total(bench, 'gzip') / Math.max(1, total(base, 'gzip'))).toFixed(2);
				lines.push(`ratio: bench-js / sign-in-js = ${ratio(signInPage)}`);
				if (smallest !== signInPage) lines.push(`ratio: bench-js / smallest (${smallest.page}) = ${ratio(smallest)}`);
				const shared = new Set(signInPage.scripts.map((s) => s.url));
				const own = bench.scripts.filter((s) => !shared.has(s.url)).sort((a, b) => b.gzip - a.gzip);
				lines.push(
					`/bench/{sample} loads ${own.length} files the sign-in page does not, ${(own.reduce((a, s) => a + s.gzip, 0) / KB).toFixed(1)} KB gzip; ` +
						`largest: ${own
							.slice(0, 4)
							.map((s) => `${fileName(s.url)} ${(s.gzip / KB).toFixed(1)} KB`)
							.join(', ')}`
				);
			}
			const largest = measured.reduce((a, b) => (total(b, 'gzip') > total(a, 'gzip') ? b : a));
			lines.push(
				`largest page: ${largest.page}, ${(total(largest, 'gzip') / KB).toFixed(1)} KB gzip; smallest: ${smallest.page}, ${(total(smallest, 'gzip') / KB).toFixed(1)} KB gzip`,
				'note: gzip -9 of each file as the build made it (node:zlib); what the server actually sent (precompressed .br/.gz or not) is not counted'
			);
			return { columns: ['page', 'status', 'files', 'raw KB', 'gzip KB'], rows: measured.map(row), lines };
		} finally {
			await browser.close();
			if (sampleId) await deleteSample(sql, sampleId);
			await sql.end({ timeout: 5 });
		}
	}
});
