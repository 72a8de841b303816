import { densityQueryOf, densityQuerySchema, type DensityQuery } from '$lib/schemas/density';
import { requireRole, type Access } from '$lib/server/access';
import { listTools } from '$lib/server/catalogue';
import { typesForPart } from '$lib/server/defects';
import { densityOf, zonesOf } from '$lib/server/density';
import { listViews } from '$lib/server/drawings';
import { trendChoices, trendParts } from '$lib/server/pareto';
import { listRepairs } from '$lib/server/repairs';
import { listMembers } from '$lib/server/team';
import { compareZones } from '$lib/spatial/change';
import type { PageServerLoad } from './$types';

/** Period B shares every filter of A but its own from / before. */
const periodB = (q: DensityQuery, from: string | undefined, to: string | undefined) => {
	const b = densityQuerySchema.safeParse({ ...q, from, to });
	return b.success ? b.data : null;
};

export const load = (async (event) => {
	const access = requireRole(event, 'engineer', 'toolmaker', 'viewer');
	const { org, role } = access;
	event.depends('app:hotspots');
	const parts = await trendParts(org.id);
	const params = event.url.searchParams;
	const part = parts.find((p) => p.id === params.get('part')) ?? parts[0] ?? null;
	if (!part) return { parts, part: null };

	const [allViews, types, tools, choices, members] = await Promise.all([
		listViews(org.id, part.id),
		typesForPart(org.id, part.id),
		listTools(org.id),
		trendChoices(org.id, part.id),
		listMembers(org.id)
	]);
	const views = allViews
		.filter((v) => v.revisions.length > 0)
		.map((v) => ({ id: v.id, name: v.name, revisionId: v.revisions[0]!.id }));
	const view = views.find((v) => v.id === params.get('view')) ?? views[0] ?? null;

	const parsed = densityQuerySchema.safeParse(densityQueryOf(params));
	const query: DensityQuery = parsed.success ? parsed.data : densityQuerySchema.parse({});
	const notUnderstood = parsed.success ? [] : parsed.error.issues.map((i) => i.message);
	const bFrom = params.get('bfrom') || undefined;
	const bTo = params.get('bto') || undefined;
	const queryB = bFrom || bTo ? periodB(query, bFrom, bTo) : null;
	if ((bFrom || bTo) && !queryB) notUnderstood.push('Period B needs ISO dates, e.g. 2026-11-30.');

	const choicesOut = {
		types: types.map(({ id, code, name, colour }) => ({ id, code, name, colour })),
		tools: tools
			.filter((t) => t.partIds.includes(part.id))
			.map(({ id, code, name, cavityCount }) => ({ id, code, name, cavityCount })),
		shifts: choices.shifts,
		inspectors: members
			.filter((m) => m.role === 'inspector' || m.role === 'engineer' || m.role === 'admin')
			.map((m) => ({ id: m.userId, name: m.name }))
	};
	const filters = {
		type: query.type ?? [],
		tool: query.tool ?? '',
		cavity: query.cavity === undefined ? '' : String(query.cavity),
		shift: query.shift ?? '',
		source: query.source ?? '',
		inspector: query.inspector ?? '',
		from: query.from ?? '',
		to: query.to ?? '',
		bfrom: queryB ? (bFrom ?? '') : '',
		bto: queryB ? (bTo ?? '') : '',
		bandwidth: query.bandwidth ?? null
	};
	if (!view) return { parts, part, views, view: null, choices: choicesOut, filters, notUnderstood };

	const [a, zones, b, zonesB, repairs] = await Promise.all([
		densityOf(org.id, view.id, query),
		zonesOf(org.id, view.id, query),
		queryB ? densityOf(org.id, view.id, queryB) : null,
		queryB ? zonesOf(org.id, view.id, queryB) : null,
		query.tool ? repairsOfTool(access, part.id, query.tool, query.cavity) : []
	]);
	const change = (x: typeof zones.zones, y: typeof zones.zones) =>
		x && y ? compareZones(x.zones, x.units, y.zones, y.units) : null;
	const changes = zonesB
		? { zones: change(zones.zones, zonesB.zones), regions: change(zones.regions, zonesB.regions) }
		: null;
	const { revisionId: _r, viewId: _v, clusterPoints: _c, ...zoneData } = zones;
	const filtered =
		(query.type?.length ?? 0) > 0 ||
		!!(query.tool || query.cavity || query.shift || query.inspector || query.source || query.from || query.to);
	return {
		parts,
		part,
		views,
		view,
		choices: choicesOut,
		filters,
		filtered,
		notUnderstood,
		density: { a, b },
		zones: zoneData,
		changes,
		repairs,
		repairHref: ['engineer', 'toolmaker', 'admin'].includes(role) ? repairLink(part.id, view.id, query, zoneData) : null
	};
}) satisfies PageServerLoad;

/** The tool's repairs on this part (the cavity's, when one is chosen), open ones first, at most six. */
async function repairsOfTool(access: Access, partId: string, toolId: string, cavity: number | undefined) {
	const lists = await Promise.all(
		(['open', 'verified', 'not_verified'] as const).map((state) =>
			listRepairs(access, { state, part: partId, tool: toolId })
		)
	);
	return lists
		.flat()
		.filter((r) => cavity === undefined || r.cavity === null || r.cavity === cavity)
		.slice(0, 6)
		.map((r) => ({
			id: r.id,
			state: r.state,
			toolCode: r.toolCode,
			cavity: r.cavity,
			zones: r.zones,
			regions: r.regions,
			createdAt: r.createdAt,
			repairDate: r.repairDate
		}));
}

/** A repair request prefilled with what is on screen: the tool, cavity and types, and the zones well above their share. */
function repairLink(
	partId: string,
	viewId: string,
	q: DensityQuery,
	z: { zones: { zones: { id: string; residual: number }[] } | null }
) {
	const p = new URLSearchParams({ part: partId, view: viewId });
	if (q.tool) p.set('tool', q.tool);
	if (q.cavity) p.set('cavity', String(q.cavity));
	for (const t of q.type ?? []) p.append('type', t);
	for (const zone of (z.zones?.zones ?? []).filter((x) => x.residual > 2).slice(0, 5)) p.append('zone', zone.id);
	return `/repairs/new?${p}`;
}
