/**
 * Where on a view defects cluster: pins binned on a grid of square cells in the view's aspect
 * ratio, in SQL (a million pins never leave the database), with the units inspected under the
 * same filters so that periods with different sample sizes compare per unit. Smoothing and
 * statistics are pure (src/lib/spatial).
 */
import { and, desc, eq, sql, type SQL } from 'drizzle-orm';
import { rgb } from 'd3-color';
import { interpolateViridis } from 'd3-scale-chromatic';
import Papa from 'papaparse';
import sharp from 'sharp';
import type { DensityQuery } from '$lib/schemas/density';
import { clarkEvans } from '$lib/spatial/cluster';
import { gridShape, perUnits, scottBandwidthFromGrid, smoothGrid } from '$lib/spatial/density';
import { rankZones, spreadVerdict, UNIFORM_RISK_CAVEAT } from '$lib/spatial/ranking';
import { zoneOf } from '$lib/spatial/zones';
import { db } from './db';
import { partView, region, viewRevision } from './db/schema';
import { notFound } from './errors';
import { getObjectBytes } from './storage';

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

/** The view and its newest revision (its image gives the aspect; its grid and regions the zones). */
async function viewOf(orgId: string, viewId: string) {
	const [view] = await db()
		.select({ id: partView.id, partId: partView.partId })
		.from(partView)
		.where(and(eq(partView.id, viewId), eq(partView.organizationId, orgId)));
	if (!view) throw notFound('That view');
	const [rev] = await db()
		.select({
			id: viewRevision.id,
			width: viewRevision.width,
			height: viewRevision.height,
			gridColumns: viewRevision.gridColumns,
			gridRows: viewRevision.gridRows
		})
		.from(viewRevision)
		.where(eq(viewRevision.viewId, viewId))
		.orderBy(desc(viewRevision.revision))
		.limit(1);
	if (!rev) throw notFound('A drawing of that view');
	return { view, rev, aspect: rev.width / rev.height };
}

/** Closed samples of the part under the filters (alias s), and the pins of the view among them (alias p). */
function filtersSql(orgId: string, partId: string, viewId: string, q: DensityQuery) {
	const samples = and_([
		sql`s.organization_id = ${orgId}`,
		sql`s.part_id = ${partId}`,
		sql`s.state = 'closed'`,
		q.tool && sql`s.tool_id = ${q.tool}`,
		q.cavity !== undefined && sql`s.cavity = ${q.cavity}`,
		q.shift && sql`s.shift = ${q.shift}`,
		q.inspector && sql`s.inspector_id = ${q.inspector}`,
		q.source && sql`s.source = ${q.source}`,
		q.from && sql`s.taken_at >= ${new Date(q.from).toISOString()}`,
		q.to && sql`s.taken_at < ${new Date(q.to).toISOString()}`
	]);
	const types = q.type ?? [];
	const pins = and_([
		samples,
		sql`p.deleted_at IS NULL`,
		sql`p.revision_id IN (SELECT id FROM view_revision WHERE view_id = ${viewId})`,
		types.length > 0 &&
			sql`p.defect_type_id IN (${sql.join(
				types.map((t) => sql`${t}::uuid`),
				sql`, `
			)})`
	]);
	return { samples, pins };
}

async function inspected(samples: SQL) {
	const [row] = await db().execute<{ units: number; samples: number }>(sql`
		SELECT coalesce(sum(s.size), 0)::float8 AS units, count(*)::int AS samples FROM sample s WHERE ${samples}`);
	return { units: Number(row?.units ?? 0), samples: Number(row?.samples ?? 0) };
}

export async function binView(orgId: string, viewId: string, q: DensityQuery): Promise<BinnedView> {
	const { view, rev, aspect } = await viewOf(orgId, viewId);
	const { columns, rows } = gridShape(aspect, q.cells);
	const where = filtersSql(orgId, view.partId, viewId, q);
	// Same edge rule as zoneOf: a point on an inner edge goes right/below; x = 1 stays in the last cell.
	const cells = await db().execute<{ cell: number; n: number }>(sql`
		SELECT (LEAST(${rows - 1}, floor(p.y * ${rows})::int) * ${columns} + LEAST(${columns - 1}, floor(p.x * ${columns})::int)) AS cell,
			count(*)::int AS n
		FROM pin p JOIN sample s ON s.id = p.sample_id
		WHERE ${where.pins}
		GROUP BY 1`);
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
		...(await inspected(where.samples))
	};
}

/** At most this many pins go into the nearest-neighbour ratio (the newest ones). */
export const CLUSTER_POINTS = 100_000;

/**
 * Zone ranking of a view: per grid zone (the newest revision's grid) and per region, against
 * "defects fall uniformly by area", with the chi-square test, and the Clark–Evans ratio of the
 * pins (coordinates scaled to the drawing's aspect, so distances are true on the drawing).
 */
export async function zonesOf(orgId: string, viewId: string, q: DensityQuery) {
	const { view, rev, aspect } = await viewOf(orgId, viewId);
	const where = filtersSql(orgId, view.partId, viewId, q);
	const [{ units, samples }, byZone, byRegion, regionRows, points] = await Promise.all([
		inspected(where.samples),
		db().execute<{ zone: string; n: number }>(sql`
			SELECT p.zone, count(*)::int AS n FROM pin p JOIN sample s ON s.id = p.sample_id
			WHERE ${where.pins} AND p.zone IS NOT NULL GROUP BY p.zone`),
		db().execute<{ region: string; n: number }>(sql`
			SELECT r.name AS region, count(*)::int AS n FROM pin p JOIN sample s ON s.id = p.sample_id
			CROSS JOIN LATERAL unnest(p.regions) AS r(name)
			WHERE ${where.pins} GROUP BY r.name`),
		db().select({ name: region.name, area: region.area }).from(region).where(eq(region.revisionId, rev.id)),
		db().execute<{ x: number; y: number }>(sql`
			SELECT p.x, p.y FROM pin p JOIN sample s ON s.id = p.sample_id
			WHERE ${where.pins} ORDER BY p.created_at DESC LIMIT ${CLUSTER_POINTS}`)
	]);
	const counts = (rows: { key: string; n: number }[]) => Object.fromEntries(rows.map((r) => [r.key, Number(r.n)]));
	const grid =
		rev.gridColumns && rev.gridRows
			? Array.from({ length: rev.gridColumns * rev.gridRows }, (_, i) => ({
					id: zoneOf(
						[
							((i % rev.gridColumns!) + 0.5) / rev.gridColumns!,
							(Math.floor(i / rev.gridColumns!) + 0.5) / rev.gridRows!
						],
						rev.gridColumns!,
						rev.gridRows!
					).label,
					area: 1 / (rev.gridColumns! * rev.gridRows!)
				}))
			: [];
	const rank = (zones: { id: string; area: number }[], c: Record<string, number>) => {
		if (!zones.length || units <= 0) return null;
		const ranking = rankZones(zones, c, units);
		return { ...ranking, verdict: spreadVerdict(ranking) };
	};
	const scaled = points.map((p) => [Number(p.x) * aspect, Number(p.y)] as [number, number]);
	return {
		viewId,
		revisionId: rev.id,
		units,
		samples,
		grid: rev.gridColumns && rev.gridRows ? { columns: rev.gridColumns, rows: rev.gridRows } : null,
		zones: rank(grid, counts(byZone.map((r) => ({ key: r.zone, n: r.n })))),
		regions: rank(
			regionRows.filter((r) => r.area > 0).map((r) => ({ id: r.name, area: r.area })),
			counts(byRegion.map((r) => ({ key: r.region, n: r.n })))
		),
		clarkEvans: clarkEvans(scaled, aspect),
		clusterPoints: scaled.length,
		caveat: UNIFORM_RISK_CAVEAT
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

/** The density map over the drawing as a PNG (viridis, up to 60 % opaque where defects are densest). */
export async function densityPng(orgId: string, viewId: string, q: DensityQuery): Promise<Buffer> {
	const map = await densityOf(orgId, viewId, q);
	const [rev] = await db()
		.select({ displayKey: viewRevision.displayKey, width: viewRevision.width, height: viewRevision.height })
		.from(viewRevision)
		.where(eq(viewRevision.id, map.revisionId));
	if (!rev) throw notFound('A drawing of that view');
	const rgba = Buffer.alloc(map.columns * map.rows * 4);
	map.density.forEach((v, i) => {
		const share = map.max > 0 ? v / map.max : 0;
		const c = rgb(interpolateViridis(share));
		rgba.set([c.r, c.g, c.b, Math.round(153 * Math.min(1, share * 1.5))], i * 4);
	});
	const overlay = await sharp(rgba, { raw: { width: map.columns, height: map.rows, channels: 4 } })
		.resize(rev.width, rev.height, { kernel: 'cubic', fit: 'fill' })
		.png()
		.toBuffer();
	return sharp(await getObjectBytes(rev.displayKey))
		.composite([{ input: overlay }])
		.png()
		.toBuffer();
}

/** The zone ranking as CSV rows (grid zones, then regions), spreadsheet-friendly. */
export async function zonesCsv(orgId: string, viewId: string, q: DensityQuery): Promise<string> {
	const r = await zonesOf(orgId, viewId, q);
	const rows = [
		['kind', 'zone', 'pins', 'units', 'defects_per_unit', 'expected', 'residual', 'share'],
		...(
			[
				['grid', r.zones],
				['region', r.regions]
			] as const
		).flatMap(([kind, ranking]) =>
			(ranking?.zones ?? []).map((z) => [kind, z.id, z.count, r.units, z.rate, z.expected, z.residual, z.share])
		)
	];
	return Papa.unparse(rows.map((row) => row.map((v) => (typeof v === 'number' ? Number(v.toPrecision(8)) : v))));
}

/** The newest pins of a view under the filters, at most `limit` of them, to draw over the map. */
export async function pinsOf(orgId: string, viewId: string, q: DensityQuery, limit = 5000) {
	const { view } = await viewOf(orgId, viewId);
	const where = filtersSql(orgId, view.partId, viewId, q);
	const [rows, [total]] = await Promise.all([
		db().execute<{ x: number; y: number; t: string }>(sql`
			SELECT p.x, p.y, p.defect_type_id AS t FROM pin p JOIN sample s ON s.id = p.sample_id
			WHERE ${where.pins} ORDER BY p.created_at DESC LIMIT ${limit}`),
		db().execute<{ n: number }>(
			sql`SELECT count(*)::int AS n FROM pin p JOIN sample s ON s.id = p.sample_id WHERE ${where.pins}`
		)
	]);
	return {
		pins: rows.map((r) => ({ x: Number(r.x), y: Number(r.y), type: r.t })),
		total: Number(total?.n ?? 0)
	};
}
