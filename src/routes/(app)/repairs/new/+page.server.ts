import { redirect } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { listTools } from '$lib/server/catalogue';
import { typesForPart } from '$lib/server/defects';
import { getRevision, listViews } from '$lib/server/drawings';
import { act } from '$lib/server/http';
import { activeParts } from '$lib/server/parts';
import { createRepair } from '$lib/server/repairs';
import { listMembers } from '$lib/server/team';
import { gridLabels } from '$lib/spatial/zones';
import { repairFormSchema } from './form';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const { org } = requireRole(event, 'engineer', 'toolmaker');
	const q = event.url.searchParams;
	const parts = await activeParts(org.id);
	const part = parts.find((p) => p.id === q.get('part')) ?? parts[0] ?? null;
	if (!part) return { parts, part: null };
	const [tools, views, types, members] = await Promise.all([
		listTools(org.id),
		listViews(org.id, part.id),
		typesForPart(org.id, part.id),
		listMembers(org.id)
	]);
	const view = views.find((v) => v.id === q.get('view')) ?? views[0] ?? null;
	// Regions and grid of the newest revision: the one the Bench pins on now.
	const newest = view?.revisions[0] ? await getRevision(org.id, view.revisions[0].id) : null;
	const makers = tools.filter((t) => t.partIds.includes(part.id));
	const zones = q
		.getAll('zone')
		.flatMap((z) => z.split(/[\s,;]+/))
		.filter(Boolean);
	return {
		parts,
		part,
		tools: makers.map((t) => ({ id: t.id, code: t.code, name: t.name, cavityCount: t.cavityCount })),
		views: views.map((v) => ({ id: v.id, name: v.name })),
		view: view ? { id: view.id, name: view.name } : null,
		regions: newest?.regions.map((r) => r.name) ?? [],
		grid:
			newest?.gridColumns && newest.gridRows
				? {
						columns: newest.gridColumns,
						rows: newest.gridRows,
						labels: gridLabels(newest.gridColumns, newest.gridRows)
					}
				: null,
		types: types.map((t) => ({ id: t.id, code: t.code, name: t.name })),
		toolmakers: members.filter((m) => m.role === 'toolmaker').map((m) => ({ id: m.userId, name: m.name })),
		prefill: {
			tool: q.get('tool') ?? '',
			cavity: q.get('cavity') ?? '',
			zones: zones.join(', '),
			regions: q.getAll('region'),
			types: q.getAll('type')
		}
	};
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const access = requireRole(event, 'engineer', 'toolmaker');
		const made = await act(event.request, repairFormSchema, async (input) => createRepair(access, input));
		if ('id' in made) redirect(303, `/repairs/${made.id}`);
		return made;
	}
} satisfies Actions;
