/**
 * The report of a part and period: gathered from the real database and object storage, drawn as
 * report.pdf by pdfkit, and read back with pdf.js (text, pages, drawing operators).
 */
import { randomUUID } from 'node:crypto';
import { fileURLToPath } from 'node:url';
import { getDocument, OPS } from 'pdfjs-dist/legacy/build/pdf.mjs';
import { render } from 'svelte/server';
import type { ComponentProps } from 'svelte';
import { describe, expect, it } from 'vitest';
import { limitSetSchema } from '../../src/lib/schemas/chart';
import { repairSchema } from '../../src/lib/schemas/repair';
import { reportPeriod, reportQuerySchema } from '../../src/lib/schemas/report';
import type { Access } from '../../src/lib/server/access';
import { db } from '../../src/lib/server/db';
import { pin, sample, sampleUnit } from '../../src/lib/server/db/schema';
import { createLimitSet, freezeLimitSet } from '../../src/lib/server/limits';
import { setPlan } from '../../src/lib/server/plans';
import { actOnRepair, createRepair } from '../../src/lib/server/repairs';
import { reportFor } from '../../src/lib/server/report';
import { pdfText } from '../../src/lib/server/report-pdf';
import { actOnSignal, evaluateSignals, listSignals } from '../../src/lib/server/signals';
import { GET } from '../../src/routes/api/v1/parts/[partId=uuid]/report.pdf/+server';
import { load } from '../../src/routes/(app)/reports/+page.server';
import ReportsPage from '../../src/routes/(app)/reports/+page.svelte';
import type { Role } from '../../src/lib/roles';
import { newPlant } from './plant';

// Montgomery, Introduction to Statistical Quality Control, personal computer final assembly:
// nonconformities in 20 samples of 5 units, Σc = 193, ū = 193 / 100 = 1.93 (also in charts.test.ts).
const MONTGOMERY = [10, 12, 8, 14, 10, 16, 11, 7, 10, 15, 9, 5, 7, 11, 12, 6, 8, 10, 7, 5];
const DAY = 24 * 3600 * 1000;
const T0 = Date.parse('2026-01-05T06:00:00Z');

async function plant(label: string) {
	const p = await newPlant(label, { partNumber: `RP-${label}`, adminName: `Admin ${label}` });
	const { access, part } = p;
	const scratch = await p.defectType(`S${label.length}`, 'Scratch');
	const dent = await p.defectType(`D${label.length}`, 'Dent');
	const flash = await p.defectType(`F${label.length}`, 'Flash');
	await setPlan(access, part.id, {
		basis: 'units',
		sampleSize: 5,
		unitName: 'unit',
		frequency: 'lot',
		everyHours: null,
		defectTypeIds: [],
		photoForSevere: false,
		sharedSamples: false
	});
	const member = async (role: Role) => (await p.member(role)).access;
	return { ...p, scratch, dent, flash, member };
}

type Plant = Awaited<ReturnType<typeof plant>>;

/** A closed sample of 5 on M7 cavity 1: half the pins (rounded down) in zone A1, the rest in A2; one dent, one flash. */
async function closedSample(p: Plant, dayIndex: number, total: number) {
	const id = randomUUID();
	const takenAt = new Date(T0 + dayIndex * DAY);
	await db().transaction(async (tx) => {
		await tx.insert(sample).values({
			id,
			organizationId: p.access.org.id,
			partId: p.part.id,
			toolId: p.mould.id,
			cavity: 1,
			inspectorId: p.access.user.id,
			takenAt,
			size: 5,
			unitCount: 5,
			state: 'closed',
			closedAt: takenAt
		});
		await tx.insert(sampleUnit).values([1, 2, 3, 4, 5].map((index) => ({ sampleId: id, index })));
		await tx.insert(pin).values(
			Array.from({ length: total }, (_, i) => {
				const left = i < Math.floor(total / 2);
				return {
					id: randomUUID(),
					organizationId: p.access.org.id,
					sampleId: id,
					unitIndex: (i % 5) + 1,
					revisionId: p.rev.id,
					defectTypeId: i === 0 ? p.dent.id : i === total - 1 ? p.flash.id : p.scratch.id,
					x: left ? 0.25 : 0.75,
					y: 0.5,
					zone: left ? 'A1' : 'A2'
				};
			})
		);
	});
	return id;
}

/** Calls the endpoint's handler as SvelteKit would, with what the request hook puts in locals. */
async function get(access: Access, partId: string, query = '') {
	const url = new URL(`http://stipple.test/api/v1/parts/${partId}/report.pdf${query}`);
	const event = {
		request: new Request(url),
		url,
		params: { partId },
		locals: { user: access.user, sessionId: 's', org: access.org, role: access.role }
	};
	return GET(event as unknown as Parameters<typeof GET>[0]);
}

async function pagesOf(bytes: ArrayBuffer) {
	const pdf = await getDocument({ data: new Uint8Array(bytes), isEvalSupported: false, standardFontDataUrl: FONTS })
		.promise;
	const pages = [];
	for (let i = 1; i <= pdf.numPages; i++) {
		const page = await pdf.getPage(i);
		const content = await page.getTextContent();
		const text = content.items.map((item) => ('str' in item ? item.str : '')).join(' ');
		pages.push({ text, ops: (await page.getOperatorList()).fnArray });
	}
	return pages;
}

// pdf.js reads the standard fonts' metrics from its own package (else it warns on every page).
const FONTS = fileURLToPath(new URL('../../node_modules/pdfjs-dist/standard_fonts/', import.meta.url));
const PERIOD = '?from=2026-01-05&to=2026-01-25&tool=';

describe('report', () => {
	it('gathers the part, period, chart, limits, signals, repairs and plan, and prints them to report.pdf', async () => {
		const p = await plant('report');
		for (const [i, c] of MONTGOMERY.entries()) await closedSample(p, i, c);
		// Limits frozen on the 20 samples: ū = 193 / 100 = 1.93, UCL for n = 5 is 3.793867 (qcc vignette).
		const set = await createLimitSet(
			p.access,
			p.part.id,
			limitSetSchema.parse({
				method: 'u',
				filters: { tool: p.mould.id, cavity: 1 },
				baseline: { from: new Date(T0 - DAY).toISOString(), to: new Date(T0 + 20 * DAY).toISOString() },
				note: 'First production month.'
			})
		);
		await freezeLimitSet(p.access, set.id);
		// Day 20: 24 defects in 5 units, 4.8 per unit, above the frozen UCL.
		const high = await closedSample(p, 20, 24);
		await evaluateSignals(p.access.org.id, p.part.id);
		const [sig] = await listSignals(p.access.org.id, { part: p.part.id, state: 'open', limit: 10 });
		expect(sig).toMatchObject({ sample: high, rule: 'beyond-limit' });
		await actOnSignal(p.access, sig!.id, {
			action: 'explain',
			cause: 'Vent blocked on cavity 1',
			taken: 'Vent cleared'
		});
		// A repair of zone A1, done on day 15.5: before it days 0–15, after it days 16–20.
		const repair = await createRepair(
			p.access,
			repairSchema.parse({ partId: p.part.id, toolId: p.mould.id, cavity: 1, viewId: p.view.id, zones: ['A1'] })
		);
		await actOnRepair(p.access, repair.id, { action: 'accept' });
		await actOnRepair(p.access, repair.id, {
			action: 'done',
			repairDate: new Date(T0 + 15.5 * DAY).toISOString(),
			workDone: 'Vent at the left end cleared.'
		});

		const q = reportQuerySchema.parse({
			part: p.part.id,
			from: '2026-01-05',
			to: '2026-01-25',
			tool: p.mould.id,
			cavity: '1'
		});
		const report = await reportFor(p.access, p.part.id, q);
		// Hand-computed: 193 + 24 = 217 defects in 21 samples of 5 = 105 units, 217 / 105 = 2.0667 per unit.
		expect(report.summary).toMatchObject({ samples: 21, units: 105, defects: 217, signalPoints: 1 });
		expect(report.summary.perUnit).toBeCloseTo(217 / 105, 12);
		expect(report.chart.center).toBeCloseTo(1.93, 12);
		expect(report.limits.inForce).toMatchObject({ id: set.id, frozenBy: 'Admin report', sampleCount: 20 });
		// Each sample has one dent and one flash, the rest scratches: 217 − 21 − 21 = 175 scratches.
		expect(report.pareto.rows.map((r) => [r.code, r.count])).toEqual([
			[p.scratch.code, 175],
			[p.dent.code, 21],
			[p.flash.code, 21]
		]);
		expect(report.typeCharts.map((t) => t.summary.defects)).toEqual([175, 21, 21]);
		expect(report.signals).toEqual([
			expect.objectContaining({ state: 'explained', cause: 'Vent blocked on cavity 1' })
		]);
		// A1 holds ⌊c/2⌋ of each sample. Before: days 0–15 sum to 78 in 80 units; after: 4 + 5 + 3 + 2 + 12 = 26 in 25.
		expect(report.repairs).toHaveLength(1);
		expect(report.repairs[0]!.check).toMatchObject({
			before: { count: 78, units: 80, samples: 16 },
			after: { count: 26, units: 25, samples: 5 }
		});
		expect(report.map?.ranking?.zones.map((z) => z.id)).toEqual(['A2', 'A1']);
		// 500 × 400 drawing, enlarged to print at 1600 px wide.
		expect([report.map?.image?.width, report.map?.image?.height]).toEqual([1600, 1280]);
		expect(report.plan).toMatchObject({ sampleSize: 5, frequency: 'lot' });

		const viewer = await p.member('viewer');
		const res = await get(viewer, p.part.id, `${PERIOD}${p.mould.id}&cavity=1`);
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe('application/pdf');
		expect(res.headers.get('content-disposition')).toBe(
			`attachment; filename="stipple-report-${p.part.number}-2026-01-05-2026-01-25.pdf"`
		);
		const buf = await res.arrayBuffer();
		const pages = await pagesOf(buf);
		// Fixed page starts: summary with the u-chart and limits; the three type charts; the Pareto;
		// the map and zones; signals, repairs, plan and cautions (each short enough for one page here).
		expect(pages).toHaveLength(5);
		const all = pages.map((pg) => pg.text).join(' ');
		for (const s of [
			p.part.number,
			'2026-01-05 to 2026-01-25',
			'Page 1 of 5',
			'Page 5 of 5',
			'Centre line of the chart',
			'1.93 defects per unit',
			'2.07',
			'Summary',
			'Limit set in force',
			'most frequent defect types',
			'Pareto of defect types',
			'Density map',
			'Defects per 100 units',
			'Zone ranking',
			'Signals in the period',
			'Vent blocked on cavity 1',
			'Repairs',
			'78 defects in 80 units',
			'26 defects in 25 units',
			'Sampling plan',
			'Cautions',
			'Frozen by',
			'Admin report'
		])
			expect(all).toContain(s);
		// The caution as the standard font prints it (’ is in WinAnsi); pdf.js gives the text back in pieces.
		expect(all.replace(/\s+/g, ' ')).toContain(
			'Statistical signals support, and do not replace, the plant’s quality procedures, customer requirements and qualified review.'
		);
		expect(pages[0]!.text).toContain('u-chart');
		expect(pages[3]!.text).toContain('Density map');
		expect(pages[4]!.text).toContain('Cautions');

		// The u-chart is drawn, not pasted: page 1 has paths (at least one per sample mark) and no image; page 4 has the map.
		const paths = (ops: number[]) => ops.filter((o) => o === OPS.constructPath).length;
		const images = (ops: number[]) => ops.filter((o) => o === OPS.paintImageXObject).length;
		expect(paths(pages[0]!.ops)).toBeGreaterThan(21);
		expect(images(pages[0]!.ops)).toBe(0);
		expect(images(pages[3]!.ops)).toBe(1);

		// The Reports screen, rendered on the server from its load: the whole report, the map from
		// density.png with the same filters, the PDF link with the same period, and the print button.
		const url = new URL(
			`http://stipple.test/reports?part=${p.part.id}&from=2026-01-05&to=2026-01-25&tool=${p.mould.id}&cavity=1`
		);
		const data = await load({
			url,
			params: {},
			locals: { user: viewer.user, sessionId: 's', org: viewer.org, role: viewer.role }
		} as unknown as Parameters<typeof load>[0]);
		const { body } = render(ReportsPage, { props: { data } as unknown as ComponentProps<typeof ReportsPage> });
		const html = body.replaceAll('&amp;', '&');
		expect(html).toContain(
			`/api/v1/parts/${p.part.id}/report.pdf?from=2026-01-05&to=2026-01-25&tool=${p.mould.id}&cavity=1`
		);
		expect(html).toContain(
			`/api/v1/views/${p.view.id}/density.png?from=2026-01-05T00%3A00%3A00.000Z&to=2026-01-26T00%3A00%3A00.000Z&tool=${p.mould.id}&cavity=1`
		);
		for (const s of [
			'Download PDF',
			'Print',
			p.part.number,
			'Vent blocked on cavity 1',
			'78 defects in 80 units',
			'Cautions'
		])
			expect(html).toContain(s);
		// Four charts drawn as SVG (the u-chart and three types) and the Pareto.
		expect(html.match(/<svg viewBox="0 0 720/g)).toHaveLength(5);
	});

	it('answers 404 to another organisation and 422 to a bad query, and defaults to the last 30 days', async () => {
		const p = await plant('report-bad');
		const other = await plant('report-other');
		expect((await get(other.access, p.part.id)).status).toBe(404);
		for (const q of [
			'?from=yesterday',
			'?cavity=0',
			'?from=2026-02-01&to=2026-01-01',
			'?tool=nope',
			'?from=2020-01-01&to=2026-01-01'
		]) {
			const res = await get(p.access, p.part.id, q);
			expect(res.status, q).toBe(422);
			expect(((await res.json()) as { error: { code: string } }).error.code).toBe('invalid');
		}
		// A tool of another organisation is not found; a cavity the tool does not have is refused.
		expect((await get(p.access, p.part.id, `?tool=${other.mould.id}`)).status).toBe(404);
		expect((await get(p.access, p.part.id, `?tool=${p.mould.id}&cavity=3`)).status).toBe(422);

		const now = new Date('2026-03-31T12:00:00Z');
		expect(reportPeriod({}, now)).toMatchObject({ fromDay: '2026-03-02', toDay: '2026-03-31' });
		expect(reportPeriod({ from: '2026-03-01', to: '2026-03-31' }, now).to.toISOString()).toBe(
			'2026-04-01T00:00:00.000Z'
		);

		// No samples at all: the report still prints, with its empty sections said in words.
		const res = await get(p.access, p.part.id);
		expect(res.status).toBe(200);
		const pages = await pagesOf(await res.arrayBuffer());
		expect(pages.map((pg) => pg.text).join(' ')).toContain('No samples in this period.');
	});

	it('prints only what the standard fonts can show', () => {
		expect(pdfText('ū ≥ 2σ − 1 · Laney u′ “ok” €')).toBe("u-bar >= 2sigma - 1 · Laney u' “ok” €");
		expect(pdfText('部品')).toBe('??');
	});
});
