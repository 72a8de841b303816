/**
 * Roll-up: per-sample counts for a chart, computed in SQL from the pins of closed samples and from
 * count-only history, never by loading pins into JavaScript. A zone or region narrows the count
 * (defects in that zone per unit inspected), not the sample size; history has no positions, so it
 * drops out of zone and region charts, and an untyped history total drops out of a per-type chart.
 * History has no source either (Bench or station), so it drops out when a source is chosen.
 */
import { sql, type SQL } from 'drizzle-orm';
import type { ChartFilters } from '$lib/schemas/chart';
import { db } from './db';

export interface RolledSample {
	/** The sample's id, or an imported sample's name. */
	sample: string;
	/** 'bench': a sample taken in Stipple (at the Bench or sent by a station); 'history': count-only. */
	source: 'bench' | 'history';
	takenAt: Date;
	size: number;
	count: number;
	/** Counts per severity class A, B, C, D (demerits). */
	classes: [number, number, number, number];
	toolId: string | null;
	cavity: number | null;
	shift: string;
}

export interface Period {
	from?: Date;
	to?: Date;
}

const and = (parts: (SQL | false | '' | undefined)[]) =>
	sql.join(
		parts.filter((p): p is SQL => !!p),
		sql` AND `
	);

export async function rollup(orgId: string, partId: string, f: ChartFilters, period: Period = {}) {
	const sampleWhere = (alias: 's' | 'h') => {
		const c = (col: string) => sql.raw(`${alias}.${col}`);
		return [
			sql`${c('organization_id')} = ${orgId}`,
			sql`${c('part_id')} = ${partId}`,
			f.tool && sql`${c('tool_id')} = ${f.tool}`,
			f.cavity !== undefined && sql`${c('cavity')} = ${f.cavity}`,
			f.shift && sql`${c('shift')} = ${f.shift}`,
			period.from && sql`${c('taken_at')} >= ${period.from.toISOString()}`,
			period.to && sql`${c('taken_at')} < ${period.to.toISOString()}`
		];
	};
	const pinOn = and([
		sql`p.sample_id = s.id`,
		sql`p.deleted_at IS NULL`,
		f.type && sql`p.defect_type_id = ${f.type}`,
		f.zone && sql`p.zone = ${f.zone}`,
		f.region && sql`${f.region} = ANY(p.regions)`
	]);
	const severity = (alias: string, count: string) =>
		sql.raw(
			['A', 'B', 'C', 'D'].map((s) => `coalesce(${count} FILTER (WHERE ${alias}.severity = '${s}'), 0)::int`).join(', ')
		);
	const bench = sql`
		SELECT s.id::text AS sample, 'bench' AS source, s.taken_at, s.size, count(p.id)::int AS count,
			ARRAY[${severity('dt', 'count(p.id)')}] AS classes, s.tool_id::text AS tool_id, s.cavity, s.shift
		FROM sample s
		LEFT JOIN pin p ON ${pinOn}
		LEFT JOIN defect_type dt ON dt.id = p.defect_type_id
		WHERE ${and([...sampleWhere('s'), sql`s.state = 'closed'`, f.source && sql`s.source = ${f.source}`])}
		GROUP BY s.id`;
	// A per-type chart keeps history samples that were counted by type (0 where the type is absent).
	const history = sql`
		SELECT h.sample_key AS sample, 'history' AS source, min(h.taken_at) AS taken_at, max(h.size) AS size,
			coalesce(sum(h.count) FILTER (WHERE ${f.type ? sql`h.defect_type_id = ${f.type}` : sql`true`}), 0)::int AS count,
			ARRAY[${severity('dt', 'sum(h.count)')}] AS classes,
			min(h.tool_id::text) AS tool_id, min(h.cavity) AS cavity, min(h.shift) AS shift
		FROM history_count h
		LEFT JOIN defect_type dt ON dt.id = h.defect_type_id
		WHERE ${and(sampleWhere('h'))}
		GROUP BY h.sample_key
		${f.type ? sql`HAVING bool_or(h.defect_type_id IS NOT NULL)` : sql``}`;
	const query =
		f.zone || f.region || f.source
			? sql`${bench} ORDER BY taken_at, sample`
			: sql`${bench} UNION ALL ${history} ORDER BY taken_at, sample`;
	const rows = await db().execute<{
		sample: string;
		source: 'bench' | 'history';
		taken_at: string | Date;
		size: number;
		count: number;
		classes: number[];
		tool_id: string | null;
		cavity: number | null;
		shift: string;
	}>(query);
	return rows.map((r): RolledSample => ({
		sample: r.sample,
		source: r.source,
		takenAt: new Date(r.taken_at),
		size: Number(r.size),
		count: Number(r.count),
		classes: r.classes.map(Number) as RolledSample['classes'],
		toolId: r.tool_id,
		cavity: r.cavity,
		shift: r.shift
	}));
}
