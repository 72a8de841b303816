import { chartQuerySchema, type ChartQuery } from '$lib/schemas/chart';
import { requireRole } from '$lib/server/access';
import { listTools } from '$lib/server/catalogue';
import { chartFor, chartKeyOf, filtersOf } from '$lib/server/charts';
import { typesForPart } from '$lib/server/defects';
import { DomainError } from '$lib/server/errors';
import { listLimitSets } from '$lib/server/limits';
import { paretoFor, trendChoices, trendParts } from '$lib/server/pareto';
import { explainedSamples } from '$lib/server/signals';
import { listMembers } from '$lib/server/team';
import type { PageServerLoad } from './$types';

/** The chart, or the reason it cannot be drawn with these settings (then the plain u-chart). */
async function chartOrReason(orgId: string, partId: string, query: ChartQuery) {
	try {
		return { chart: await chartFor(orgId, partId, query), problem: '' };
	} catch (e) {
		if (!(e instanceof DomainError)) throw e;
		const { limitSet: _dropped, ...rest } = query;
		const fallback = { ...rest, method: query.method === 'c' ? ('u' as const) : query.method };
		return { chart: await chartFor(orgId, partId, fallback), problem: e.message };
	}
}

export const load = (async (event) => {
	const { org, role } = requireRole(event, 'engineer', 'toolmaker', 'viewer');
	event.depends('app:trends');
	const canEditLimits = role === 'engineer' || role === 'admin';
	const parts = await trendParts(org.id);
	const params = Object.fromEntries(event.url.searchParams);
	const part = parts.find((p) => p.id === params.part) ?? parts[0] ?? null;
	if (!part) return { parts, part: null, canEditLimits };

	const { part: _part, ...rest } = params;
	const parsed = chartQuerySchema.safeParse(rest);
	const query: ChartQuery = parsed.success ? parsed.data : chartQuerySchema.parse({ method: rest.method });
	const notUnderstood = parsed.success ? [] : parsed.error.issues.map((i) => i.message);
	const period = { from: query.from ? new Date(query.from) : undefined, to: query.to ? new Date(query.to) : undefined };
	const filters = filtersOf(query);
	const { type: _type, ...paretoFilters } = filters;

	const [{ chart, problem }, pareto, types, tools, choices] = await Promise.all([
		chartOrReason(org.id, part.id, query),
		paretoFor(org.id, part.id, paretoFilters, period),
		typesForPart(org.id, part.id),
		listTools(org.id),
		trendChoices(org.id, part.id)
	]);

	let limits = null;
	if (canEditLimits) {
		const [sets, members, explained] = await Promise.all([
			listLimitSets(org.id, part.id),
			listMembers(org.id),
			explainedSamples(org.id, part.id)
		]);
		const name = new Map(members.map((m) => [m.userId, m.name]));
		const key = chartKeyOf(filters);
		limits = {
			sets: sets.map((s) => ({
				id: s.id,
				state: s.state,
				method: s.method,
				k: s.k,
				rate: s.rate,
				sigmaZ: s.sigmaZ,
				appliesFrom: s.appliesFrom,
				sampleCount: s.sampleCount,
				exclusions: s.exclusions,
				note: s.note,
				frozenAt: s.frozenAt,
				chartKey: s.chartKey,
				filters: s.filters as Record<string, string | number>,
				baselineFrom: s.baselineFrom,
				baselineTo: s.baselineTo,
				baselineSamples: s.baselineSamples,
				createdAt: s.createdAt,
				createdBy: (s.createdBy && name.get(s.createdBy)) || 'a former member',
				frozenBy: s.frozenBy ? (name.get(s.frozenBy) ?? 'a former member') : null,
				thisChart: s.chartKey === key
			})),
			explained: explained.map((e) => ({ sample: e.sample, cause: e.cause }))
		};
	}

	return {
		parts,
		part,
		canEditLimits,
		query: {
			method: chart.method,
			type: query.type ?? '',
			zone: query.zone ?? '',
			region: query.region ?? '',
			tool: query.tool ?? '',
			cavity: query.cavity === undefined ? '' : String(query.cavity),
			shift: query.shift ?? '',
			source: query.source ?? '',
			from: query.from ?? '',
			to: query.to ?? '',
			limitSet: problem ? '' : (query.limitSet ?? '')
		},
		filtered: Object.keys(filters).length > 0 || !!query.from || !!query.to,
		notUnderstood,
		problem,
		chart,
		pareto,
		types: types.map(({ id, code, name, colour, shape }) => ({ id, code, name, colour, shape })),
		tools: tools
			.filter((t) => t.partIds.includes(part.id))
			.map(({ id, code, name, cavityCount }) => ({ id, code, name, cavityCount })),
		choices,
		limits
	};
}) satisfies PageServerLoad;
