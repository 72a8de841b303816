/**
 * Pareto of defect types for a part and period, and what the Trends filters can offer: counted in
 * SQL from the pins of closed samples and from count-only history typed by defect, the same way
 * the roll-up counts them (src/lib/server/rollup.ts). History has no positions and no source, so it
 * drops out when a zone, a region or a source narrows the count.
 */
import { sql, type SQL } from 'drizzle-orm';
import type { ChartFilters } from '$lib/schemas/chart';
import type { MarkerColour, MarkerShape, Severity } from '$lib/markers';
import { db } from './db';
import type { Period } from './rollup';

export interface ParetoRow {
	defectTypeId: string;
	code: string;
	name: string;
	colour: MarkerColour;
	shape: MarkerShape;
	severity: Severity;
	count: number;
}

const and = (parts: (SQL | false | '' | undefined)[]) =>
	sql.join(
		parts.filter((p): p is SQL => !!p),
		sql` AND `
	);

/** Counts by defect type, most frequent first; `untyped` is history counted without a type. */
export async function paretoFor(
	orgId: string,
	partId: string,
	f: Omit<ChartFilters, 'type'>,
	period: Period = {}
): Promise<{ rows: ParetoRow[]; total: number; untyped: number }> {
	const where = (alias: 's' | 'h') => {
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
	const bench = sql`
		SELECT p.defect_type_id AS type_id, count(*)::int AS count
		FROM pin p JOIN sample s ON s.id = p.sample_id
		WHERE ${and([
			...where('s'),
			sql`s.state = 'closed'`,
			sql`p.deleted_at IS NULL`,
			f.source && sql`s.source = ${f.source}`,
			f.zone && sql`p.zone = ${f.zone}`,
			f.region && sql`${f.region} = ANY(p.regions)`
		])}
		GROUP BY p.defect_type_id`;
	const history = sql`
		SELECT h.defect_type_id AS type_id, sum(h.count)::int AS count
		FROM history_count h
		WHERE ${and(where('h'))}
		GROUP BY h.defect_type_id`;
	const benchOnly = !!(f.zone || f.region || f.source);
	const rows = await db().execute<{
		type_id: string | null;
		code: string | null;
		name: string | null;
		colour: MarkerColour | null;
		shape: MarkerShape | null;
		severity: Severity | null;
		position: number | null;
		count: number;
	}>(sql`
		SELECT x.type_id::text AS type_id, t.code, t.name, t.colour, t.shape, t.severity, t.position,
			sum(x.count)::int AS count
		FROM (${benchOnly ? bench : sql`${bench} UNION ALL ${history}`}) x
		LEFT JOIN defect_type t ON t.id = x.type_id AND t.organization_id = ${orgId}
		GROUP BY x.type_id, t.code, t.name, t.colour, t.shape, t.severity, t.position
		ORDER BY sum(x.count) DESC, t.position NULLS LAST, t.code`);
	let untyped = 0;
	const typed: ParetoRow[] = [];
	for (const r of rows) {
		const count = Number(r.count);
		if (!r.type_id || !r.code) {
			untyped += count;
			continue;
		}
		if (count === 0) continue;
		typed.push({
			defectTypeId: r.type_id,
			code: r.code,
			name: r.name ?? r.code,
			colour: r.colour ?? 'graphite',
			shape: r.shape ?? 'dot',
			severity: r.severity ?? 'D',
			count
		});
	}
	return { rows: typed, total: typed.reduce((sum, r) => sum + r.count, 0), untyped };
}

/** Active parts with the newest closed sample or history first, then the rest by number. */
export async function trendParts(orgId: string) {
	const rows = await db().execute<{
		id: string;
		number: string;
		name: string;
		samples: number;
		last: string | Date | null;
	}>(sql`
		SELECT p.id::text AS id, p.number, p.name,
			(SELECT count(*) FROM sample s WHERE s.part_id = p.id AND s.state = 'closed')::int
				+ (SELECT count(DISTINCT h.sample_key) FROM history_count h WHERE h.part_id = p.id)::int AS samples,
			greatest(
				(SELECT max(s.taken_at) FROM sample s WHERE s.part_id = p.id AND s.state = 'closed'),
				(SELECT max(h.taken_at) FROM history_count h WHERE h.part_id = p.id)
			) AS last
		FROM part p
		WHERE p.organization_id = ${orgId} AND p.archived_at IS NULL
		ORDER BY last DESC NULLS LAST, p.number`);
	return rows.map((r) => ({
		id: r.id,
		number: r.number,
		name: r.name,
		samples: Number(r.samples),
		last: r.last ? new Date(r.last) : null
	}));
}

/** Zones and regions that carry pins or are drawn on the part, and shifts that were sampled. */
export async function trendChoices(orgId: string, partId: string) {
	const [zones, regions, shifts] = await Promise.all([
		db().execute<{ zone: string }>(sql`
			SELECT DISTINCT p.zone FROM pin p JOIN sample s ON s.id = p.sample_id
			WHERE s.organization_id = ${orgId} AND s.part_id = ${partId} AND p.zone IS NOT NULL AND p.deleted_at IS NULL
			ORDER BY p.zone`),
		db().execute<{ name: string }>(sql`
			SELECT DISTINCT r.name FROM region r
			JOIN view_revision vr ON vr.id = r.revision_id
			JOIN part_view pv ON pv.id = vr.view_id
			WHERE pv.organization_id = ${orgId} AND pv.part_id = ${partId}
			ORDER BY r.name`),
		db().execute<{ shift: string }>(sql`
			SELECT shift FROM sample WHERE organization_id = ${orgId} AND part_id = ${partId} AND shift <> ''
			UNION
			SELECT shift FROM history_count WHERE organization_id = ${orgId} AND part_id = ${partId} AND shift <> ''
			ORDER BY shift`)
	]);
	// Zone labels sort as drawings read them: column letters, then row numbers (B2 before B10).
	const zoneKey = (z: string) => {
		const m = /^([A-Z]+)(\d+)$/.exec(z);
		return m ? `${m[1]!.padStart(2, ' ')}${m[2]!.padStart(3, '0')}` : z;
	};
	return {
		zones: zones.map((z) => z.zone).sort((a, b) => zoneKey(a).localeCompare(zoneKey(b))),
		regions: regions.map((r) => r.name),
		shifts: shifts.map((s) => s.shift)
	};
}
