/**
 * Where on a view defects cluster: pins binned on a grid of square cells in the view's aspect
 * ratio, in SQL (a million pins never leave the database), with the units inspected under the
 * same filters so that periods with different sample sizes compare per unit. Smoothing and
 * statistics are pure (src/lib/spatial).
 */
import { and, desc, eq, sql, type SQL } from 'drizzle-orm';
import type { DensityQuery } from '$lib/schemas/density';
import { gridShape, perUnits, scottBandwidthFromGrid, smoothGrid } from '$lib/spatial/density';
import { db } from './db';
import { partView, viewRevision } from './db/schema';
import { notFound } from './errors';

export interface BinnedView {
	viewId: string;
	partId: string;
	revisionId: string;
	/** Width / height of the newest revision's image. */
	aspect: number;
	columns: number;
	rows: number;
	/** Pins per cell, row-major (row 0 at the top). */
	counts: number[];
	pins: number;
	/** Units inspected in the samples that match the filters (the denominator of per-unit rates). */
	units: number;
	samples: number;
}

const and_ = (parts: (SQL | false | '' | undefined)[]) =>
	sql.join(
		parts.filter((p): p is SQL => !!p),
		sql` AND `
	);

export async function binView(orgId: string, viewId: string, q: DensityQuery): Promise<BinnedView> {
	const [view] = await db()
		.select({ id: partView.id, partId: partView.partId })
		.from(partView)
		.where(and(eq(partView.id, viewId), eq(partView.organizationId, orgId)));
	if (!view) throw notFound('That view');
	const [rev] = await db()
		.select({ id: viewRevision.id, width: viewRevision.width, height: viewRevision.height })
		.from(viewRevision)
		.where(eq(viewRevision.viewId, viewId))
		.orderBy(desc(viewRevision.revision))
		.limit(1);
	if (!rev) throw notFound('A drawing of that view');
	const aspect = rev.width / rev.height;
	const { columns, rows } = gridShape(aspect, q.cells);

	const sampleWhere = and_([
		sql`s.organization_id = ${orgId}`,
		sql`s.part_id = ${view.partId}`,
		sql`s.state = 'closed'`,
		q.tool && sql`s.tool_id = ${q.tool}`,
		q.cavity !== undefined && sql`s.cavity = ${q.cavity}`,
		q.shift && sql`s.shift = ${q.shift}`,
		q.inspector && sql`s.inspector_id = ${q.inspector}`,
		q.from && sql`s.taken_at >= ${new Date(q.from).toISOString()}`,
		q.to && sql`s.taken_at < ${new Date(q.to).toISOString()}`
	]);
	const types = q.type ?? [];
	// Same edge rule as zoneOf: a point on an inner edge goes right/below; x = 1 stays in the last cell.
	const cells = await db().execute<{ cell: number; n: number }>(sql`
		SELECT (LEAST(${rows - 1}, floor(p.y * ${rows})::int) * ${columns} + LEAST(${columns - 1}, floor(p.x * ${columns})::int)) AS cell,
			count(*)::int AS n
		FROM pin p
		JOIN sample s ON s.id = p.sample_id
		JOIN view_revision r ON r.id = p.revision_id
		WHERE ${sampleWhere} AND p.deleted_at IS NULL AND r.view_id = ${viewId}
			${
				types.length
					? sql`AND p.defect_type_id IN (${sql.join(
							types.map((t) => sql`${t}::uuid`),
							sql`, `
						)})`
					: sql``
			}
		GROUP BY 1`);
	const [inspected] = await db().execute<{ units: number; samples: number }>(sql`
		SELECT coalesce(sum(s.size), 0)::float8 AS units, count(*)::int AS samples FROM sample s WHERE ${sampleWhere}`);

	const counts = new Array<number>(columns * rows).fill(0);
	let pins = 0;
	for (const c of cells) {
		counts[Number(c.cell)] = Number(c.n);
		pins += Number(c.n);
	}
	return {
		viewId,
		partId: view.partId,
		revisionId: rev.id,
		aspect,
		columns,
		rows,
		counts,
		pins,
		units: Number(inspected?.units ?? 0),
		samples: Number(inspected?.samples ?? 0)
	};
}

/**
 * The density map of a view: binned counts smoothed by a Gaussian kernel (Scott's rule unless a
 * bandwidth is given, in drawing widths), in defects per 100 units inspected per cell.
 */
export async function densityOf(orgId: string, viewId: string, q: DensityQuery) {
	const binned = await binView(orgId, viewId, q);
	const { columns, rows, counts } = binned;
	// The grid's cells are square: one drawing width is `columns` cells, one height `rows` cells.
	const scott = scottBandwidthFromGrid(counts, columns, rows);
	const bandwidth = q.bandwidth
		? { x: q.bandwidth, y: q.bandwidth * binned.aspect }
		: (scott ?? { x: 1 / columns, y: 1 / rows });
	const smoothed = smoothGrid(counts, columns, rows, bandwidth);
	const per100 = binned.units > 0 ? Array.from(perUnits(smoothed, binned.units, 100)) : smoothed.map(() => 0);
	const round = (v: number) => Math.round(v * 1e4) / 1e4;
	return {
		...binned,
		bandwidth: { x: bandwidth.x, y: bandwidth.y, rule: q.bandwidth ? 'given' : scott ? 'scott' : 'one cell' },
		perUnits: 100,
		density: Array.from(per100, round),
		max: round(Math.max(0, ...per100))
	};
}
