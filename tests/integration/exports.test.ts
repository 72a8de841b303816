/**
 * CSV downloads under the Trends filters (pins, samples, chart points) through the route handlers,
 * against the real database: streaming with bounded memory, formats, filters and access; and the
 * source filter (Bench or station) on charts, Pareto and density.
 */
import { randomUUID } from 'node:crypto';
import v8 from 'node:v8';
import { runInNewContext } from 'node:vm';
import { sql } from 'drizzle-orm';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { chartQuerySchema } from '../../src/lib/schemas/chart';
import { densityQuerySchema } from '../../src/lib/schemas/density';
import type { Access } from '../../src/lib/server/access';
import { chartFor, chartKeyOf, filtersOf } from '../../src/lib/server/charts';
import { db } from '../../src/lib/server/db';
import { historyCount, historyImport, pin, sample } from '../../src/lib/server/db/schema';
import { binView } from '../../src/lib/server/density';
import { csvLines, PIN_COLUMNS, SAMPLE_COLUMNS } from '../../src/lib/server/exports';
import { paretoFor } from '../../src/lib/server/pareto';
import type { Role } from '../../src/lib/roles';
import { GET as chartCsvGet } from '../../src/routes/api/v1/parts/[partId=uuid]/chart.csv/+server';
import { GET as pinsCsvGet } from '../../src/routes/api/v1/parts/[partId=uuid]/pins.csv/+server';
import { GET as samplesCsvGet } from '../../src/routes/api/v1/parts/[partId=uuid]/samples.csv/+server';
import { newPlant } from './plant';

const ISO = /^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/;
const HYPERLINK = '=HYPERLINK("http://x.test","go")';

async function plant(label: string, inspectorName = `${label} inspector`) {
	const p = await newPlant(label, {
		partNumber: `X-${label}`,
		partName: 'Bracket',
		mould: { code: 'M1', name: 'Bracket mould' },
		adminName: inspectorName
	});
	// SK's name would run as a formula in a spreadsheet; DT applies to the part but is never pinned.
	const sk = await p.defectType('SK', HYPERLINK);
	const fl = await p.defectType('FL', 'Flash');
	const dt = await p.defectType('DT', 'Dent');
	const member = async (role: Role) => (await p.member(role)).access;
	return { ...p, sk, fl, dt, member };
}

type Plant = Awaited<ReturnType<typeof plant>>;

interface SampleSpec {
	takenAt: string;
	size?: number;
	tool?: boolean;
	cavity?: number;
	shift?: string;
	lot?: string;
	source?: 'bench' | 'station';
	state?: 'open' | 'closed';
	/** type, zone (left half A1 or right half A2), creation time, deleted */
	pins?: { type: string; zone: 'A1' | 'A2'; at: string; regions?: string[]; deleted?: boolean }[];
}

async function addSample(p: Plant, s: SampleSpec) {
	const id = randomUUID();
	await db()
		.insert(sample)
		.values({
			id,
			organizationId: p.access.org.id,
			partId: p.part.id,
			toolId: s.tool ? p.mould.id : null,
			cavity: s.cavity ?? null,
			shift: s.shift ?? '',
			lot: s.lot ?? '',
			inspectorId: p.access.user.id,
			takenAt: new Date(s.takenAt),
			size: s.size ?? 5,
			unitCount: s.size ?? 5,
			state: s.state ?? 'closed',
			closedAt: (s.state ?? 'closed') === 'closed' ? new Date(s.takenAt) : null,
			source: s.source ?? 'bench'
		});
	if (s.pins?.length) {
		await db()
			.insert(pin)
			.values(
				s.pins.map((x, i) => ({
					id: randomUUID(),
					organizationId: p.access.org.id,
					sampleId: id,
					unitIndex: (i % 5) + 1,
					revisionId: p.rev.id,
					defectTypeId: x.type,
					x: x.zone === 'A1' ? 0.25 : 0.75,
					y: 0.5,
					zone: x.zone,
					regions: x.regions ?? [],
					createdAt: new Date(x.at),
					deletedAt: x.deleted ? new Date(x.at) : null
				}))
			);
	}
	return id;
}

// The events differ only in their route id; each handler gets the one SvelteKit would build.
const HANDLERS = {
	'pins.csv': (event: unknown) => pinsCsvGet(event as Parameters<typeof pinsCsvGet>[0]),
	'samples.csv': (event: unknown) => samplesCsvGet(event as Parameters<typeof samplesCsvGet>[0]),
	'chart.csv': (event: unknown) => chartCsvGet(event as Parameters<typeof chartCsvGet>[0])
};

/** Calls the endpoint's handler as SvelteKit would, with what the request hook puts in locals. */
async function get(access: Access, partId: string, file: keyof typeof HANDLERS, query: Record<string, string> = {}) {
	const url = new URL(`http://stipple.test/api/v1/parts/${partId}/${file}?${new URLSearchParams(query)}`);
	const event = {
		request: new Request(url),
		url,
		params: { partId },
		locals: { user: access.user, sessionId: 's', org: access.org, role: access.role }
	};
	return HANDLERS[file](event);
}

async function table(res: Response) {
	expect(res.status).toBe(200);
	const text = await res.text();
	const rows = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
	return { text, header: rows[0]!, rows: rows.slice(1) };
}

/** Rows as objects keyed by the header. */
const records = (t: { header: string[]; rows: string[][] }) =>
	t.rows.map((r) => Object.fromEntries(t.header.map((h, i) => [h, r[i]!])));

/** The hand-made case: three closed samples, an open one, a deleted pin, and one imported history sample. */
async function smallCase(label: string) {
	const p = await plant(label, '@inspector Ana');
	const s1 = await addSample(p, {
		takenAt: '2026-11-30T08:15:00.000Z',
		tool: true,
		cavity: 1,
		shift: 'A',
		lot: '-12',
		pins: [
			{ type: p.sk.id, zone: 'A1', at: '2026-11-30T08:20:00.000Z', regions: ['gate side', 'rib'] },
			{ type: p.sk.id, zone: 'A1', at: '2026-11-30T08:21:00.000Z' },
			{ type: p.fl.id, zone: 'A2', at: '2026-11-30T08:22:00.000Z' }
		]
	});
	const s2 = await addSample(p, {
		takenAt: '2026-12-01T09:00:00.000Z',
		tool: true,
		cavity: 2,
		shift: 'B',
		source: 'station',
		pins: [{ type: p.sk.id, zone: 'A2', at: '2026-12-01T09:01:00.000Z' }]
	});
	const s3 = await addSample(p, {
		takenAt: '2026-12-02T10:00:00.000Z',
		pins: [{ type: p.fl.id, zone: 'A1', at: '2026-12-02T10:01:00.000Z', deleted: true }]
	});
	await addSample(p, {
		takenAt: '2026-12-03T10:00:00.000Z',
		state: 'open',
		pins: [{ type: p.fl.id, zone: 'A1', at: '2026-12-03T10:01:00.000Z' }]
	});
	const [imp] = await db()
		.insert(historyImport)
		.values({ organizationId: p.access.org.id, partId: p.part.id, fileName: 'old.csv', rowCount: 1, sampleCount: 1 })
		.returning();
	await db()
		.insert(historyCount)
		.values({
			organizationId: p.access.org.id,
			partId: p.part.id,
			importId: imp!.id,
			sampleKey: 'H-1',
			takenAt: new Date('2026-11-01T06:00:00.000Z'),
			size: 5,
			count: 4,
			line: 2
		});
	return { p, s1, s2, s3 };
}

/** The V8 collector, so that heap samples count what is kept rather than garbage not yet collected. */
function collector(): () => void {
	v8.setFlagsFromString('--expose-gc');
	return runInNewContext('gc') as () => void;
}

describe('CSV writer', () => {
	it('quotes what needs quoting and makes formulae inert in text, never in numbers', () => {
		// Hand-written expectations (RFC 4180 quoting; a leading apostrophe on =, +, -, @ text).
		expect(csvLines([['-12', -12, '=1+1', '@x', '+1', 'a,b', 'say "hi"', null, 0.25]])).toBe(
			`"'-12",-12,"'=1+1","'@x","'+1","a,b","say ""hi""",,0.25\r\n`
		);
		expect(csvLines([[new Date('2026-11-30T08:15:00Z'), 'plain']])).toBe('2026-11-30T08:15:00.000Z,plain\r\n');
		expect(csvLines([])).toBe('');
	});
});

describe('CSV downloads', () => {
	it('streams 200,000 pins with bounded memory, and the file matches the database', async () => {
		const p = await plant('stream');
		const ids: string[] = [];
		for (const [i, takenAt] of [
			'2026-11-02T06:00:00Z',
			'2026-11-03T06:00:00Z',
			'2026-11-04T06:00:00Z',
			'2026-11-05T06:00:00Z'
		].entries()) {
			ids.push(await addSample(p, { takenAt, size: 50, tool: true, cavity: (i % 2) + 1 }));
		}
		// 200,000 pins straight into the table, each with its own creation time (00:00:00.001 + i ms) to find it by.
		// (Foreign-key triggers off for this bulk load only: the ids are known to be right.)
		await db().transaction(async (tx) => {
			await tx.execute(sql`SET LOCAL session_replication_role = replica`);
			await tx.execute(sql`
				INSERT INTO pin (id, organization_id, sample_id, unit_index, revision_id, defect_type_id, x, y, zone, regions, created_at)
				SELECT gen_random_uuid(), ${p.access.org.id}, (string_to_array(${ids.join(',')}, ',')::uuid[])[1 + i % 4],
					1 + (i % 50), ${p.rev.id}, CASE WHEN i % 3 = 0 THEN ${p.fl.id}::uuid ELSE ${p.sk.id}::uuid END,
					(i % 1000) / 1000.0, ((i / 1000) % 200) / 200.0,
					CASE WHEN i % 1000 < 500 THEN 'A1' ELSE 'A2' END,
					CASE WHEN i % 7 = 0 THEN ARRAY['gate side', 'rib'] ELSE ARRAY[]::text[] END,
					timestamptz '2026-11-01T00:00:00Z' + i * interval '1 millisecond'
				FROM generate_series(1, 200000) AS i`);
		});

		const gc = collector();
		gc();
		const start = process.memoryUsage();
		let peakHeap = 0;
		let peakRss = 0;
		const sampleMemory = () => {
			gc();
			const now = process.memoryUsage();
			peakHeap = Math.max(peakHeap, now.heapUsed - start.heapUsed);
			peakRss = Math.max(peakRss, now.rss - start.rss);
		};

		const res = await get(p.access, p.part.id, 'pins.csv');
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8');
		// Chunk by chunk: complete lines go through papaparse, the rest waits for the next chunk
		// (no field in this file holds a line break). Only counts and a few rows are kept.
		const reader = res.body!.getReader();
		const decoder = new TextDecoder('utf-8', { ignoreBOM: false });
		const byType = new Map<string, number>();
		const byTime = new Map<string, Record<string, string>>();
		const wanted = new Set(['2026-11-01T00:00:00.001Z', '2026-11-01T00:01:17.777Z', '2026-11-01T00:03:20.000Z']);
		let header: string[] | undefined;
		let rows = 0;
		let bytes = 0;
		let chunks = 0;
		let rest = '';
		const take = (text: string) => {
			for (const row of Papa.parse<string[]>(text, { skipEmptyLines: true }).data) {
				if (!header) {
					header = row;
					continue;
				}
				rows++;
				const r = Object.fromEntries(header.map((h, i) => [h, row[i]!]));
				byType.set(r.type!, (byType.get(r.type!) ?? 0) + 1);
				if (wanted.has(r.time!)) byTime.set(r.time!, r);
			}
		};
		for (;;) {
			const { done, value } = await reader.read();
			if (done) break;
			bytes += value.byteLength;
			chunks++;
			const text = rest + decoder.decode(value, { stream: true });
			const cut = text.lastIndexOf('\r\n');
			take(text.slice(0, cut + 2));
			rest = text.slice(cut + 2);
			if (chunks % 5 === 0) sampleMemory();
		}
		take(rest + decoder.decode());
		sampleMemory();

		// Bounded: the heap kept while streaming grows by less than 8 MB for a file of over 25 MB.
		const CEILING = 8 * 1024 * 1024;
		const mb = (n: number) => `${(n / 1024 / 1024).toFixed(1)} MB`;
		console.log(
			`pins.csv: ${rows} rows, ${mb(bytes)} in ${chunks} chunks; peak growth after collection: heap ${mb(peakHeap)}, rss ${mb(peakRss)} (ceiling ${mb(CEILING)} of heap)`
		);
		expect(bytes).toBeGreaterThan(25 * 1024 * 1024);
		expect(chunks).toBeGreaterThan(50);
		expect(peakHeap).toBeLessThan(CEILING);
		expect(peakHeap).toBeLessThan(bytes / 3);
		// The process as a whole (looser: allocator and heap pages are not given back at once).
		expect(peakRss).toBeLessThan(bytes);

		// Round trip: the header, the row count and the per-type counts are the database's.
		expect(header).toEqual(PIN_COLUMNS);
		expect(rows).toBe(200_000);
		const counts = await db().execute<{ code: string; n: number }>(sql`
			SELECT dt.code, count(*)::int AS n FROM pin p JOIN defect_type dt ON dt.id = p.defect_type_id
			JOIN sample s ON s.id = p.sample_id WHERE s.part_id = ${p.part.id} GROUP BY dt.code`);
		expect(Object.fromEntries(byType)).toEqual(Object.fromEntries(counts.map((c) => [c.code, Number(c.n)])));
		expect(byType.get('FL')).toBe(66_666); // i divisible by 3 in 1..200000

		// Spot checks: pins i = 1, 77777 and 200000 found by their creation time, against their rows in the table.
		expect(byTime.size).toBe(3);
		for (const time of wanted) {
			const [db_] = await db().execute<{
				sample: string;
				unit: number;
				code: string;
				x: number;
				y: number;
				zone: string;
				regions: string[];
				taken_at: string;
			}>(sql`
				SELECT s.id::text AS sample, p.unit_index AS unit, dt.code, p.x, p.y, p.zone, p.regions, s.taken_at
				FROM pin p JOIN sample s ON s.id = p.sample_id JOIN defect_type dt ON dt.id = p.defect_type_id
				WHERE s.part_id = ${p.part.id} AND p.created_at = ${time}`);
			const row = byTime.get(time)!;
			expect(row).toMatchObject({
				sample: db_!.sample,
				unit: String(db_!.unit),
				view: 'Front',
				type: db_!.code,
				zone: db_!.zone,
				regions: db_!.regions.join(';'),
				inspector: 'stream inspector',
				source: 'bench',
				sample_taken_at: new Date(db_!.taken_at).toISOString()
			});
			expect([Number(row.x), Number(row.y)]).toEqual([Number(db_!.x), Number(db_!.y)]);
		}
		// Hand-worked: 77777 = 7 · 11111 (both regions), not ÷ 3 (SK), 77777 % 50 = 27 (unit 28).
		expect(byTime.get('2026-11-01T00:01:17.777Z')).toMatchObject({ type: 'SK', unit: '28', regions: 'gate side;rib' });
		expect(byTime.get('2026-11-01T00:03:20.000Z')).toMatchObject({ type: 'SK', regions: '' }); // 200000: not ÷ 3, not ÷ 7
	}, 180_000);

	it('writes UTF-8 with or without the byte-order mark, ISO times, and inert formulae', async () => {
		const { p, s1, s2 } = await smallCase('format');
		const plain = await get(p.access, p.part.id, 'pins.csv');
		expect(plain.headers.get('content-type')).toBe('text/csv; charset=utf-8');
		const today = new Date().toISOString().slice(0, 10);
		expect(plain.headers.get('content-disposition')).toMatch(
			new RegExp(`^attachment; filename="X-format-pins-${today}\\.csv"`)
		);
		const bytes = new Uint8Array(await plain.arrayBuffer());
		expect(new TextDecoder().decode(bytes.slice(0, 7))).toBe('sample,');

		const withBom = await get(p.access, p.part.id, 'pins.csv', { bom: '1' });
		const bomBytes = new Uint8Array(await withBom.arrayBuffer());
		expect([...bomBytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
		expect(bomBytes.length).toBe(bytes.length + 3);
		for (const file of ['samples.csv', 'chart.csv'] as const) {
			const b = new Uint8Array(await (await get(p.access, p.part.id, file, { bom: '1' })).arrayBuffer());
			expect([...b.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
		}

		const pins = await table(await get(p.access, p.part.id, 'pins.csv'));
		expect(pins.header).toEqual(PIN_COLUMNS);
		// Live pins of closed samples only: not the deleted one, not the open sample's.
		const rows = records(pins);
		expect(rows.map((r) => [r.sample, r.type, r.zone])).toEqual([
			[s1, 'SK', 'A1'],
			[s1, 'SK', 'A1'],
			[s1, 'FL', 'A2'],
			[s2, 'SK', 'A2']
		]);
		expect(rows[0]).toMatchObject({
			time: '2026-11-30T08:20:00.000Z',
			sample_taken_at: '2026-11-30T08:15:00.000Z',
			regions: 'gate side;rib',
			x: '0.25',
			unit: '1',
			source: 'bench',
			revision: 'A',
			// Text that a spreadsheet would run is written with a leading apostrophe.
			type_name: `'${HYPERLINK}`,
			inspector: "'@inspector Ana"
		});
		expect(rows[3]!.source).toBe('station');
		for (const r of rows) expect([r.time, r.sample_taken_at].every((t) => ISO.test(t!))).toBe(true);
		expect(pins.text).toContain(`"'=HYPERLINK(""http://x.test"",""go"")"`);

		// The sample's lot "-12" is text (guarded); its size 5 is a number (not).
		const samples = records(await table(await get(p.access, p.part.id, 'samples.csv')));
		expect(samples[0]).toMatchObject({ lot: "'-12", size: '5', taken_at: '2026-11-30T08:15:00.000Z' });
	});

	it('narrows pins by type, tool and cavity, period, source, zone and region', async () => {
		const { p, s1, s2 } = await smallCase('filters');
		const pinsOf = async (q: Record<string, string>) =>
			records(await table(await get(p.access, p.part.id, 'pins.csv', q))).map(
				(r) => `${r.sample === s1 ? 1 : r.sample === s2 ? 2 : '?'}${r.type}`
			);
		expect(await pinsOf({})).toEqual(['1SK', '1SK', '1FL', '2SK']);
		expect(await pinsOf({ type: p.sk.id })).toEqual(['1SK', '1SK', '2SK']);
		expect(await pinsOf({ tool: p.mould.id, cavity: '2' })).toEqual(['2SK']);
		expect(await pinsOf({ from: '2026-11-30', to: '2026-12-01' })).toEqual(['1SK', '1SK', '1FL']);
		expect(await pinsOf({ from: '2026-12-01T00:00:00Z' })).toEqual(['2SK']);
		expect(await pinsOf({ source: 'station' })).toEqual(['2SK']);
		expect(await pinsOf({ source: 'bench' })).toEqual(['1SK', '1SK', '1FL']);
		expect(await pinsOf({ zone: 'A2' })).toEqual(['1FL', '2SK']);
		expect(await pinsOf({ region: 'rib' })).toEqual(['1SK']);
		expect(await pinsOf({ shift: 'B', type: p.fl.id })).toEqual([]);
		// Empty values mean "any", as on the Trends page; the page's own `part` is ignored.
		expect(await pinsOf({ type: '', tool: '', part: p.part.id })).toHaveLength(4);
	});

	it('counts live pins per defect type in samples.csv (hand-made case)', async () => {
		const { p, s1, s2, s3 } = await smallCase('samples');
		const all = await table(await get(p.access, p.part.id, 'samples.csv'));
		// Every type in use for the part, by code: DT applies but has no pins.
		expect(all.header).toEqual([...SAMPLE_COLUMNS, 'DT', 'FL', 'SK', 'total']);
		// Hand-counted: S1 2 SK + 1 FL; S2 1 SK (a station's); S3 clean (its only pin was deleted); the open sample is left out.
		const pick = (r: Record<string, string>) => [
			r.sample,
			r.tool,
			r.cavity,
			r.shift,
			r.source,
			r.DT,
			r.FL,
			r.SK,
			r.total
		];
		expect(records(all).map(pick)).toEqual([
			[s1, 'M1', '1', 'A', 'bench', '0', '1', '2', '3'],
			[s2, 'M1', '2', 'B', 'station', '0', '0', '1', '1'],
			[s3, '', '', '', 'bench', '0', '0', '0', '0']
		]);
		expect(records(all)[0]).toMatchObject({ size: '5', unit_count: '5', inspector: "'@inspector Ana" });
		// A type or zone narrows the counts, as on the chart, not the samples.
		const sk = records(await table(await get(p.access, p.part.id, 'samples.csv', { type: p.sk.id })));
		expect(sk.map((r) => [r.FL, r.SK, r.total])).toEqual([
			['0', '2', '2'],
			['0', '1', '1'],
			['0', '0', '0']
		]);
		const right = records(await table(await get(p.access, p.part.id, 'samples.csv', { zone: 'A2' })));
		expect(right.map((r) => r.total)).toEqual(['1', '1', '0']);
		const station = records(await table(await get(p.access, p.part.id, 'samples.csv', { source: 'station' })));
		expect(station.map((r) => r.sample)).toEqual([s2]);
	});

	it('writes the chart points with the values chartFor computes', async () => {
		const { p, s1, s2, s3 } = await smallCase('chart');
		for (const q of [{}, { method: 'standardized' }, { source: 'bench' }, { tool: p.mould.id }] as Record<
			string,
			string
		>[]) {
			const expected = await chartFor(p.access.org.id, p.part.id, chartQuerySchema.parse(q));
			const t = await table(await get(p.access, p.part.id, 'chart.csv', q));
			expect(t.header).toEqual([
				'sample',
				'taken_at',
				'source',
				'size',
				'count',
				'value',
				'centre',
				'lcl',
				'ucl',
				'z',
				'signals',
				'excluded',
				'phase',
				'limit_set',
				'limits'
			]);
			const rows = records(t);
			expect(rows).toHaveLength(expected.points.length);
			const num = (v: string | undefined) => (v === '' || v === undefined ? null : Number(v));
			rows.forEach((r, i) => {
				const pt = expected.points[i]!;
				expect(r.sample).toBe(pt.sample);
				expect(r.taken_at).toBe(pt.takenAt.toISOString());
				expect([num(r.size), num(r.count), num(r.value), num(r.lcl), num(r.ucl), num(r.z)]).toEqual([
					pt.size,
					pt.count,
					pt.value,
					pt.lcl,
					pt.ucl,
					pt.z
				]);
				expect(num(r.centre)).toBe(expected.phases[pt.phase]!.center);
				expect(r.signals).toBe(pt.signals.map((s) => s.rule).join(';'));
				expect([r.phase, r.limits]).toEqual([String(pt.phase), 'provisional']);
			});
		}
		// All points: history first (1 Nov), the station's sample marked as such; ū = (4 + 3 + 1 + 0) / 20 = 0.4 (hand-computed).
		const rows = records(await table(await get(p.access, p.part.id, 'chart.csv')));
		expect(rows.map((r) => [r.sample, r.source, r.count])).toEqual([
			['H-1', 'history', '4'],
			[s1, 'bench', '3'],
			[s2, 'station', '1'],
			[s3, 'bench', '0']
		]);
		expect(Number(rows[0]!.centre)).toBeCloseTo(0.4, 12);
		// z of the clean sample is negative, and written as a number, not guarded as text.
		expect(Number(rows[3]!.z)).toBeCloseTo(-0.4 / Math.sqrt(0.4 / 5), 12);
		expect(rows[3]!.z!.startsWith('-')).toBe(true);
	});

	it('lets every member export, answers 404 for another organisation and 422 for a bad filter', async () => {
		const { p } = await smallCase('access');
		const viewer = await p.member('viewer');
		for (const file of ['pins.csv', 'samples.csv', 'chart.csv'] as const) {
			expect((await get(viewer, p.part.id, file)).status).toBe(200);
		}
		const stranger = await plant('access-other');
		for (const file of ['pins.csv', 'samples.csv', 'chart.csv'] as const) {
			const res = await get(stranger.access, p.part.id, file);
			expect(res.status).toBe(404);
			expect(await res.json()).toMatchObject({ error: { code: 'not_found' } });
		}
		const bads: Record<string, string>[] = [
			{ cavity: 'two' },
			{ source: 'robot' },
			{ bom: 'yes' },
			{ from: '30/11/2026' },
			{ type: 'SK' }
		];
		for (const bad of bads) {
			for (const file of ['pins.csv', 'samples.csv', 'chart.csv'] as const) {
				const res = await get(p.access, p.part.id, file, bad);
				expect(res.status, `${file} ${JSON.stringify(bad)}`).toBe(422);
				expect(res.headers.get('content-type')).toMatch(/^application\/json/);
				const body = (await res.json()) as { error: { code: string; issues: { path: string }[] } };
				expect(body.error.code).toBe('invalid');
				expect(body.error.issues.map((i) => i.path)).toEqual([Object.keys(bad)[0]]);
			}
		}
	});
});

describe('source filter', () => {
	it('keeps a station sample to source=station, and drops history under any source', async () => {
		const { p, s1, s2, s3 } = await smallCase('source');
		const q = (v: Record<string, unknown>) => chartQuerySchema.parse(v);
		const samplesOf = async (v: Record<string, unknown>) =>
			(await chartFor(p.access.org.id, p.part.id, q(v))).points.map((pt) => [pt.sample, pt.source, pt.count]);
		expect(await samplesOf({})).toEqual([
			['H-1', 'history', 4],
			[s1, 'bench', 3],
			[s2, 'bench', 1],
			[s3, 'bench', 0]
		]);
		expect(await samplesOf({ source: 'station' })).toEqual([[s2, 'bench', 1]]);
		expect(await samplesOf({ source: 'bench' })).toEqual([
			[s1, 'bench', 3],
			[s3, 'bench', 0]
		]);
		// A station-only chart is a chart of its own (its own limit sets); without a source the key is as before.
		expect(chartKeyOf(filtersOf(q({ source: 'station' })))).toBe('{"source":"station"}');
		expect(chartKeyOf(filtersOf(q({})))).toBe('{}');
		expect((await chartFor(p.access.org.id, p.part.id, q({ source: 'station' }))).filters).toEqual({
			source: 'station'
		});
		expect(chartQuerySchema.safeParse({ source: 'robot' }).success).toBe(false);

		// The Pareto beside the chart: history's untyped 4 counts only without a source.
		const pareto = (source?: 'bench' | 'station') =>
			paretoFor(p.access.org.id, p.part.id, source ? { source } : {}).then((r) => [
				r.rows.map((x) => [x.code, x.count]),
				r.untyped
			]);
		expect(await pareto()).toEqual([
			[
				['SK', 3],
				['FL', 1]
			],
			4
		]);
		expect(await pareto('station')).toEqual([[['SK', 1]], 0]);
		expect(await pareto('bench')).toEqual([
			[
				['SK', 2],
				['FL', 1]
			],
			0
		]);

		// Hot spots: pins and units inspected of the station's samples only.
		const station = await binView(
			p.access.org.id,
			p.view.id,
			densityQuerySchema.parse({ source: 'station', cells: 10 })
		);
		expect([station.pins, station.units, station.samples]).toEqual([1, 5, 1]);
		const bench = await binView(p.access.org.id, p.view.id, densityQuerySchema.parse({ source: 'bench', cells: 10 }));
		expect([bench.pins, bench.units, bench.samples]).toEqual([3, 10, 2]);
	});
});
