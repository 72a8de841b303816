/** Pins binned in SQL for the density map: the edge rule, the filters, the units, and a million pins. */
import { randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { densityQuerySchema } from '../../src/lib/schemas/density';
import { db } from '../../src/lib/server/db';
import { pin, sample } from '../../src/lib/server/db/schema';
import { createDefectType } from '../../src/lib/server/defects';
import { binView, densityOf, densityPng, zonesCsv, zonesOf } from '../../src/lib/server/density';
import Papa from 'papaparse';
import sharp from 'sharp';
import { closeSample, startSample, writePin } from '../../src/lib/server/samples';
import { startSampleSchema } from '../../src/lib/schemas/sample';
import { addRegion, addRevision, createView, setGrid } from '../../src/lib/server/drawings';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { good } from '../fixtures/images';
import { accessFor, newUser } from './helpers';

async function plant(label: string) {
	const admin = await newUser(label);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = await createPart(access, { number: `D-${label}`, name: 'Plate', material: '', process: '', notes: '' });
	const view = await createView(access, part.id, 'Front');
	// 500 × 400: aspect 1.25, so 10 cells across give 10 × 8.
	const rev = await addRevision(access, view.id, await good.webp());
	const type = (code: string) =>
		createDefectType(access, {
			code,
			name: code,
			description: '',
			colour: 'sky',
			shape: 'dot',
			severity: 'C',
			allParts: true,
			partIds: []
		});
	return { access, part, view, rev, a: await type(`A${label.length}`), b: await type(`B${label.length}`) };
}

type Plant = Awaited<ReturnType<typeof plant>>;

async function closedSample(p: Plant, size: number, cavity: number, pins: [number, number, string][]) {
	const id = randomUUID();
	await db().insert(sample).values({
		id,
		organizationId: p.access.org.id,
		partId: p.part.id,
		inspectorId: p.access.user.id,
		cavity,
		size,
		unitCount: size,
		state: 'closed',
		closedAt: new Date()
	});
	if (pins.length) {
		await db()
			.insert(pin)
			.values(
				pins.map(([x, y, type]) => ({
					id: randomUUID(),
					organizationId: p.access.org.id,
					sampleId: id,
					unitIndex: 1,
					revisionId: p.rev.id,
					defectTypeId: type,
					x,
					y
				}))
			);
	}
	return id;
}

const q = (v: Record<string, unknown>) => densityQuerySchema.parse({ cells: 10, ...v });

describe('density binning in SQL', () => {
	it('bins on square cells with the zone edge rule, filters, and counts the units inspected', async () => {
		const p = await plant('bins');
		await closedSample(p, 5, 1, [
			[0.5, 0.5, p.a.id], // on inner edges: the cell right of and below them → column 5, row 4
			[1, 1, p.a.id], // the far corner stays in the last cell
			[0, 0, p.b.id],
			[0.05, 0.05, p.b.id]
		]);
		await closedSample(p, 3, 2, [[0.99, 0.01, p.a.id]]);
		const all = await binView(p.access.org.id, p.view.id, q({}));
		expect([all.columns, all.rows, all.counts.length]).toEqual([10, 8, 80]);
		expect([all.pins, all.units, all.samples]).toEqual([5, 8, 2]);
		const at = (r: number, c: number) => all.counts[r * all.columns + c];
		expect([at(4, 5), at(7, 9), at(0, 0), at(0, 9)]).toEqual([1, 1, 2, 1]);

		const typeA = await binView(p.access.org.id, p.view.id, q({ type: [p.a.id] }));
		expect([typeA.pins, typeA.units]).toEqual([3, 8]); // a type narrows the pins, not the units inspected
		const cavity2 = await binView(p.access.org.id, p.view.id, q({ cavity: 2 }));
		expect([cavity2.pins, cavity2.units, cavity2.samples]).toEqual([1, 3, 1]);

		const stranger = await plant('bins-other');
		await expect(binView(stranger.access.org.id, p.view.id, q({}))).rejects.toMatchObject({ status: 404 });
	});

	it('ranks grid zones and regions against uniform-by-area, with chi-square and Clark–Evans', async () => {
		const p = await plant('zones');
		await setGrid(p.access, p.rev.id, { columns: 2, rows: 1 });
		const leftHalf: [number, number][] = [
			[0, 0],
			[0.5, 0],
			[0.5, 1],
			[0, 1]
		];
		await addRegion(p.access, p.rev.id, { name: 'left', points: leftHalf });
		const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id, size: 2 }));
		const spots: [number, number, number][] = [
			[1, 0.1, 0.2],
			[1, 0.2, 0.3],
			[2, 0.3, 0.6],
			[2, 0.15, 0.8],
			[2, 0.8, 0.5]
		];
		for (const [unitIndex, x, y] of spots) {
			await writePin(p.access, s.id, {
				id: randomUUID(),
				unitIndex,
				revisionId: p.rev.id,
				defectTypeId: p.a.id,
				x,
				y,
				note: ''
			});
		}
		await closeSample(p.access, s.id);
		const r = await zonesOf(p.access.org.id, p.view.id, q({}));
		expect([r.units, r.grid]).toEqual([2, { columns: 2, rows: 1 }]);
		// Hand-checked: O = 4, 1 against E = 2.5, 2.5 → X² = 2 · 1.5² / 2.5 = 1.8 on 1 df.
		expect(r.zones?.zones.map((z) => [z.id, z.count, z.expected])).toEqual([
			['A1', 4, 2.5],
			['A2', 1, 2.5]
		]);
		expect(r.zones?.test.statistic).toBeCloseTo(1.8, 12);
		expect(r.zones?.test.df).toBe(1);
		expect(r.zones?.zones[0]?.rate).toBe(2); // 4 defects in 2 units
		expect(r.regions?.zones.map((z) => [z.id, z.count])).toEqual([['left', 4]]);
		expect(r.clarkEvans?.n).toBe(5);
		expect(r.caveat).toMatch(/do not carry the same risk/);

		// Exports: the table as CSV (parsed back), the map as a PNG the size of the drawing.
		const csv = Papa.parse<string[]>(await zonesCsv(p.access.org.id, p.view.id, q({})), { skipEmptyLines: true }).data;
		expect(csv[0]).toEqual(['kind', 'zone', 'pins', 'units', 'defects_per_unit', 'expected', 'residual', 'share']);
		expect(csv.slice(1).map((row) => [row[0], row[1], row[2]])).toEqual([
			['grid', 'A1', '4'],
			['grid', 'A2', '1'],
			['region', 'left', '4']
		]);
		const png = await sharp(await densityPng(p.access.org.id, p.view.id, q({}))).metadata();
		expect([png.format, png.width, png.height]).toEqual(['png', 500, 400]);
	});

	it('answers a million pins with the grid only, never the points', async () => {
		const p = await plant('million');
		const sampleId = await closedSample(p, 5000, 1, []);
		// A million pins straight into the table, spread over the drawing (a cluster near the top-left).
		// (Foreign-key triggers off for this bulk load only: the ids are known to be right.)
		await db().transaction(async (tx) => {
			await tx.execute(sql`SET LOCAL session_replication_role = replica`);
			await tx.execute(sql`
			INSERT INTO pin (id, organization_id, sample_id, unit_index, revision_id, defect_type_id, x, y)
			SELECT gen_random_uuid(), ${p.access.org.id}, ${sampleId}, 1 + (i % 5000), ${p.rev.id}, ${p.a.id},
				CASE WHEN i % 4 = 0 THEN 0.1 + (i % 97) / 970.0 ELSE (i % 1000) / 1000.0 END,
				CASE WHEN i % 4 = 0 THEN 0.1 + (i % 89) / 890.0 ELSE ((i / 1000) % 1000) / 1000.0 END
			FROM generate_series(1, 1000000) AS i`);
		});
		const grid = await binView(p.access.org.id, p.view.id, q({ cells: 40 }));
		expect(grid.pins).toBe(1_000_000);
		expect(grid.counts.reduce((a, b) => a + b, 0)).toBe(1_000_000);
		expect(grid.counts).toHaveLength(40 * 32);
		// The endpoint's answer is the grid: a few kilobytes, not a million coordinates.
		const map = await densityOf(p.access.org.id, p.view.id, q({ cells: 40 }));
		expect(map.density).toHaveLength(40 * 32);
		expect(JSON.stringify(map).length).toBeLessThan(40_000);
		// Smoothing keeps the mass: Σ per-100-units density = 100 · pins / units (within 0.1 %).
		const mass = map.density.reduce((a, b) => a + b, 0);
		expect(Math.abs(mass - (100 * 1_000_000) / 5000) / ((100 * 1_000_000) / 5000)).toBeLessThan(0.001);
		expect(map.bandwidth.rule).toBe('scott');
	}, 120_000);
});
