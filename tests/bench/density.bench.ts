/**
 * (c) The density grid of a view with 1,000,000 pins: through `GET /api/v1/views/{id}/density.json`
 * (binned in SQL, smoothed in the app), against the npm package fast-kde (Heer 2021, Deriche's
 * approximation) computing a grid from the same points loaded into Node, in the same run. Prints
 * the times, the ratios and how far the two grids differ once both are normalised to a total of 1.
 */
import { density2d } from 'fast-kde';
import postgres from 'postgres';
import { defineBench, HttpSession, ms, percentile, type Cell } from './helpers';

const PINS = 1_000_000;
const CELLS = 40;
const BANDWIDTH = 0.03; // drawing widths, the same for both
const RUNS = 5;

const median = (xs: number[]) =>
	percentile(
		[...xs].sort((a, b) => a - b),
		0.5
	)!;

export default defineBench({
	title: `density grid of ${PINS.toLocaleString('en')} pins: the endpoint against fast-kde in Node`,
	async run(ctx) {
		const sql = postgres(ctx.databaseUrl, { max: 2, onnotice: () => {} });
		const session = new HttpSession(ctx.url);
		await session.signIn('engineer@example.com', 'pin-the-defects');
		const lines: string[] = [];
		let sampleId: string | undefined;
		try {
			const [demo] = await sql<
				{
					orgId: string;
					partId: string;
					viewId: string;
					revisionId: string;
					width: number;
					height: number;
					typeId: string;
					userId: string;
				}[]
			>`
				SELECT p.organization_id AS "orgId", p.id AS "partId", v.id AS "viewId", r.id AS "revisionId", r.width, r.height,
					(SELECT id FROM defect_type WHERE organization_id = p.organization_id ORDER BY position LIMIT 1) AS "typeId",
					(SELECT u.id FROM "user" u WHERE u.email = 'inspector@example.com') AS "userId"
				FROM part p JOIN part_view v ON v.part_id = p.id AND v.name = 'Front'
				JOIN view_revision r ON r.view_id = v.id
				WHERE p.number = 'FW-118' ORDER BY r.revision DESC LIMIT 1`;
			if (!demo) throw new Error('The demo part FW-118 is not there.');
			const aspect = demo.width / demo.height;

			// A million pins in one closed sample, in a far-away week so the demo's own pins stay out.
			sampleId = crypto.randomUUID();
			const seedStart = performance.now();
			await sql.begin(async (tx) => {
				await tx`SET LOCAL session_replication_role = replica`;
				await tx`INSERT INTO sample (id, organization_id, part_id, inspector_id, taken_at, size, unit_count, state, closed_at)
					VALUES (${sampleId!}, ${demo.orgId}, ${demo.partId}, ${demo.userId}, '2020-01-06T06:00:00Z', 5000, 500, 'closed', now())`;
				await tx`
					INSERT INTO pin (id, organization_id, sample_id, unit_index, revision_id, defect_type_id, x, y)
					SELECT gen_random_uuid(), ${demo.orgId}, ${sampleId!}, 1 + (i % 500), ${demo.revisionId}, ${demo.typeId},
						CASE WHEN i % 3 = 0 THEN 0.3 + 0.1 * sqrt(-2 * ln(random())) * cos(6.283185 * random()) ELSE random() END,
						CASE WHEN i % 3 = 0 THEN 0.7 + 0.1 * sqrt(-2 * ln(random())) * sin(6.283185 * random()) ELSE random() END
					FROM generate_series(1, ${PINS}) AS i`;
				await tx`UPDATE pin SET x = least(1, greatest(0, x)), y = least(1, greatest(0, y)) WHERE sample_id = ${sampleId!}`;
			});
			lines.push(`seeded ${PINS.toLocaleString('en')} pins in ${ms(performance.now() - seedStart)} ms`);
			// As after any bulk load (the UPDATE left a dead row per pin): autovacuum would otherwise run during later benchmarks.
			await sql`VACUUM (ANALYZE) pin`;
			const query = `from=2020-01-01&to=2020-02-01&cells=${CELLS}&bandwidth=${BANDWIDTH}`;

			// Stipple: the endpoint (warm once, then RUNS times).
			type Grid = { columns: number; rows: number; density: number[]; pins: number };
			const fetchGrid = () => session.json<Grid>('GET', `/api/v1/views/${demo.viewId}/density.json?${query}`);
			const warm = await fetchGrid();
			const apiTimes: number[] = [];
			let grid = warm;
			for (let i = 0; i < RUNS; i++) {
				const t = performance.now();
				grid = await fetchGrid();
				apiTimes.push(performance.now() - t);
			}
			const payload = JSON.stringify(grid).length;

			// Baseline: the same points loaded into Node, then fast-kde on the same grid and bandwidth.
			const loadTimes: number[] = [];
			const kdeTimes: number[] = [];
			let kde: Float64Array | number[] = [];
			for (let i = 0; i < RUNS; i++) {
				const t0 = performance.now();
				const rows = await sql<{ x: number; y: number }[]>`SELECT x, y FROM pin WHERE sample_id = ${sampleId!}`;
				const xs = new Float64Array(rows.length);
				const ys = new Float64Array(rows.length);
				rows.forEach((r, j) => ((xs[j] = r.x), (ys[j] = r.y)));
				const t1 = performance.now();
				const idx = Array.from({ length: rows.length }, (_, j) => j);
				const d2 = density2d(idx, {
					x: (j: number) => xs[j]!,
					y: (j: number) => ys[j]!,
					bins: [grid.columns, grid.rows],
					extent: [
						[0, 1],
						[0, 1]
					],
					bandwidth: [BANDWIDTH, BANDWIDTH * aspect]
				});
				kde = d2.grid();
				const t2 = performance.now();
				loadTimes.push(t1 - t0);
				kdeTimes.push(t2 - t1);
			}

			// How far apart the two grids are, each normalised to a total of 1.
			const norm = (g: ArrayLike<number>) => {
				let s = 0;
				for (let i = 0; i < g.length; i++) s += g[i]!;
				return Array.from(g, (v) => v / s);
			};
			const a = norm(grid.density);
			const b = norm(kde);
			let l1 = 0;
			let maxDiff = 0;
			let maxCell = 0;
			for (let i = 0; i < a.length; i++) {
				const d = Math.abs(a[i]! - (b[i] ?? 0));
				l1 += d;
				maxDiff = Math.max(maxDiff, d);
				maxCell = Math.max(maxCell, a[i]!);
			}
			const api = median(apiTimes);
			const kdeOnly = median(kdeTimes);
			const both = median(loadTimes.map((l, i) => l + kdeTimes[i]!));
			const rows: Record<string, Cell>[] = [
				{
					run: 'Stipple endpoint (SQL bins + smoothing + HTTP)',
					'median ms': ms(api),
					'payload KB': (payload / 1024).toFixed(1)
				},
				{ run: 'fast-kde on points in Node (kde only)', 'median ms': ms(kdeOnly), 'payload KB': null },
				{ run: 'fast-kde incl. loading the points from SQL', 'median ms': ms(both), 'payload KB': null }
			];
			lines.push(
				`ratio: endpoint / fast-kde (kde only) = ${(api / kdeOnly).toFixed(2)}`,
				`ratio: endpoint / fast-kde (load + kde) = ${(api / both).toFixed(2)}`,
				`grids ${grid.columns} × ${grid.rows}, bandwidth ${BANDWIDTH} drawing widths; pins counted by the endpoint: ${grid.pins.toLocaleString('en')}`,
				`difference of the normalised grids: L1 = ${l1.toFixed(4)} (0 same, 2 disjoint), largest cell difference ${maxDiff.toExponential(2)} ` +
					`(largest cell ${maxCell.toExponential(2)}); fast-kde bins linearly onto grid points, Stipple counts pins per cell, so they differ by about a cell's offset`
			);
			return { columns: ['run', 'median ms', 'payload KB'], rows, lines };
		} finally {
			if (sampleId) await sql`DELETE FROM sample WHERE id = ${sampleId}`;
			await sql.end({ timeout: 5 });
		}
	}
});
