/**
 * The demo's past, invented: thirty paper tally sheets from before Fernwick used Stipple (imported
 * as count-only history, from which the u-chart limits were frozen), then eight weeks of Bench
 * samples with their pins. Five weeks ago the gate insert of cavity 3 began to wear: short shots
 * and flow marks near the gate rose in that cavity's samples and the chart signalled; two weeks ago
 * the toolroom repaired it, and the spot fades. Sink marks at the bosses stay as they were. Seeded with
 * fixed random seeds, so every demo shows the same story.
 */
import { randomUUID } from 'node:crypto';
import normalRandom from '@stdlib/random-base-normal';
import poissonRandom from '@stdlib/random-base-poisson';
import uniformRandom from '@stdlib/random-base-uniform';
import { regionsOf, zoneOf, type Point } from '$lib/spatial/zones';
import type { Db } from './db';
import { historyCount, historyImport, limitSet, pin, sample, sampleUnit } from './db/schema';
import { limitParameters } from './limits';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

const DAY = 24 * 3600 * 1000;
const SIZE = 5;
const SEVERITY_INDEX = { A: 0, B: 1, C: 2, D: 3 } as const;

/** Defects per unit by type code, in a settled process; and where on the front view each tends to be. */
const BASE_RATE: Record<string, number> = {
	SS: 0.12,
	SK: 0.32,
	FL: 0.28,
	WL: 0.2,
	SC: 0.24,
	BM: 0.05,
	CT: 0.03,
	FM: 0.1
};
/** Cavity 3 with a worn gate insert: more short shots, and flow marks by the gate. */
const WORN_RATE: Record<string, number> = { ...BASE_RATE, SS: 1.0, FM: 0.8 };

const px = (x: number, y: number): Point => [x / 1600, y / 1000];
const WHERE: Record<string, { centres: Point[]; spread: number }> = {
	SS: { centres: [px(700, 200), px(1130, 220)], spread: 0.03 },
	SK: { centres: [px(270, 220), px(1130, 220), px(270, 700), px(1130, 700)], spread: 0.015 },
	FL: { centres: [px(200, 460), px(1200, 460), px(700, 150), px(700, 770)], spread: 0.06 },
	WL: { centres: [px(520, 460), px(880, 460)], spread: 0.04 },
	SC: { centres: [px(700, 460)], spread: 0.18 },
	BM: { centres: [px(260, 170), px(1140, 170)], spread: 0.02 },
	CT: { centres: [px(700, 460)], spread: 0.2 },
	FM: { centres: [px(700, 730), px(640, 700)], spread: 0.03 }
};

export interface DemoContext {
	orgId: string;
	partId: string;
	toolId: string;
	inspectorId: string;
	engineerId: string;
	frontRevisionId: string;
	sectionRevisionId: string;
	grid: { columns: number; rows: number };
	regions: { name: string; points: Point[] }[];
	types: { id: string; code: string; severity: keyof typeof SEVERITY_INDEX }[];
}

export async function seedDemoHistory(tx: Tx, d: DemoContext, now = new Date()) {
	const poisson = poissonRandom.factory({ seed: 118 });
	const uniform = uniformRandom.factory({ seed: 4 });
	const normal = normalRandom.factory({ seed: 3 });
	const today = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate());

	// Paper tally sheets, one sample of 5 a day, 100 to 71 days ago.
	const [sheet] = await tx
		.insert(historyImport)
		.values({
			organizationId: d.orgId,
			partId: d.partId,
			fileName: 'tally-sheets-2026.csv',
			rowCount: 30 * d.types.length,
			sampleCount: 30,
			createdBy: d.engineerId
		})
		.returning({ id: historyImport.id });
	const paper: { count: number; size: number; classes: [number, number, number, number] }[] = [];
	const rows: (typeof historyCount.$inferInsert)[] = [];
	for (let day = 0; day < 30; day++) {
		const takenAt = new Date(today - (100 - day) * DAY + 7 * 3600 * 1000);
		const classes: [number, number, number, number] = [0, 0, 0, 0];
		let total = 0;
		for (const t of d.types) {
			const c = poisson(BASE_RATE[t.code]! * SIZE);
			classes[SEVERITY_INDEX[t.severity]] += c;
			total += c;
			rows.push({
				organizationId: d.orgId,
				partId: d.partId,
				importId: sheet!.id,
				sampleKey: `T-${String(day + 1).padStart(3, '0')}`,
				takenAt,
				size: SIZE,
				count: c,
				defectTypeId: t.id,
				toolId: d.toolId,
				cavity: (day % 4) + 1,
				shift: 'A',
				line: rows.length + 2
			});
		}
		paper.push({ count: total, size: SIZE, classes });
	}
	await tx.insert(historyCount).values(rows);

	// Limits frozen from the paper period: they judge every Bench sample since.
	const baselineFrom = new Date(today - 101 * DAY);
	const baselineTo = new Date(today - 70 * DAY);
	await tx.insert(limitSet).values({
		organizationId: d.orgId,
		partId: d.partId,
		method: 'u',
		filters: {},
		chartKey: '{}',
		k: 3,
		baselineFrom,
		baselineTo,
		...limitParameters(paper),
		appliesFrom: baselineFrom,
		state: 'frozen',
		note: 'From the 30 paper tally sheets, before Stipple.',
		createdBy: d.engineerId,
		createdAt: new Date(today - 62 * DAY),
		frozenBy: d.engineerId,
		frozenAt: new Date(today - 62 * DAY)
	});

	// Bench samples: one a day for 56 days, cavities in turn; the gate insert of cavity 3 wears from day 35.
	const shifts = ['A', 'B', 'C'];
	const samples: (typeof sample.$inferInsert)[] = [];
	const units: (typeof sampleUnit.$inferInsert)[] = [];
	const pins: (typeof pin.$inferInsert)[] = [];
	for (let day = 0; day < 56; day++) {
		const id = randomUUID();
		const cavity = (day % 4) + 1;
		// Worn from day 20 (36 days ago) until the toolroom repaired it on day 42 (14 days ago).
		const worn = cavity === 3 && day >= 20 && day < 42;
		const takenAt = new Date(today - (56 - day) * DAY + (6 + (day % 3) * 8) * 3600 * 1000);
		samples.push({
			id,
			organizationId: d.orgId,
			partId: d.partId,
			toolId: d.toolId,
			cavity,
			shift: shifts[day % 3]!,
			lot: `L${2600 + Math.floor(day / 7)}`,
			inspectorId: d.inspectorId,
			takenAt,
			size: SIZE,
			unitCount: SIZE,
			state: 'closed',
			closedAt: new Date(takenAt.getTime() + 25 * 60 * 1000),
			closedBy: d.inspectorId,
			createdAt: takenAt
		});
		const pinned = new Set<number>();
		for (const t of d.types) {
			const rate = (worn ? WORN_RATE : BASE_RATE)[t.code]!;
			for (let i = 0, n = poisson(rate * SIZE); i < n; i++) {
				const unitIndex = 1 + Math.floor(uniform(0, SIZE));
				pinned.add(unitIndex);
				const onSection = uniform(0, 1) < 0.1;
				const spot = WHERE[t.code]!;
				const centre = spot.centres[Math.floor(uniform(0, spot.centres.length))]!;
				const clamp = (v: number) => Math.min(0.995, Math.max(0.005, v));
				const point: Point = onSection
					? [clamp(uniform(0.15, 0.85)), clamp(uniform(0.35, 0.65))]
					: [clamp(centre[0] + normal(0, spot.spread)), clamp(centre[1] + normal(0, spot.spread))];
				pins.push({
					id: randomUUID(),
					organizationId: d.orgId,
					sampleId: id,
					unitIndex,
					revisionId: onSection ? d.sectionRevisionId : d.frontRevisionId,
					defectTypeId: t.id,
					x: point[0],
					y: point[1],
					zone: onSection ? null : zoneOf(point, d.grid.columns, d.grid.rows).label,
					regions: onSection ? [] : regionsOf(point, d.regions),
					createdBy: d.inspectorId,
					createdAt: takenAt,
					updatedAt: takenAt
				});
			}
		}
		for (let index = 1; index <= SIZE; index++) units.push({ sampleId: id, index, clean: !pinned.has(index) });
	}
	await tx.insert(sample).values(samples);
	await tx.insert(sampleUnit).values(units);
	for (let i = 0; i < pins.length; i += 1000) await tx.insert(pin).values(pins.slice(i, i + 1000));
	return { samples: samples.length, pins: pins.length };
}
