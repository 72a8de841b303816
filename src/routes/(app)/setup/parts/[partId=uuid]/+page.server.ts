import { partSchema, viewSchema } from '$lib/schemas/part';
import { samplingPlanFormSchema } from '$lib/schemas/plan';
import { requireRole } from '$lib/server/access';
import { historyOf } from '$lib/server/audit';
import { typesForPart } from '$lib/server/defects';
import { createView, listViews } from '$lib/server/drawings';
import { act, pageLoad } from '$lib/server/http';
import { getPart, updatePart } from '$lib/server/parts';
import { getPlan, setPlan } from '$lib/server/plans';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';

export const load = pageLoad(async (event) => {
	const { org, role } = requireRole(event, 'engineer', 'inspector', 'toolmaker', 'viewer');
	const { partId } = event.params;
	const part = await getPart(org.id, partId);
	const [views, plan, types, history] = await Promise.all([
		listViews(org.id, partId),
		getPlan(org.id, partId),
		typesForPart(org.id, partId),
		historyOf(org.id, 'part', partId)
	]);
	return {
		part,
		views,
		plan,
		types: types.map(({ id, code, name, colour, shape, severity }) => ({ id, code, name, colour, shape, severity })),
		history,
		canEdit: role === 'engineer' || role === 'admin'
	};
}) satisfies PageServerLoad;

export const actions = {
	update: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, partSchema, async (input) => {
			await updatePart(access, event.params.partId, input);
			return { saved: 'part' };
		});
	},
	archive: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, z.object({ archived: z.enum(['true', 'false']) }), async ({ archived }) => {
			await updatePart(access, event.params.partId, { archived: archived === 'true' });
			return { saved: archived === 'true' ? 'archived' : 'restored' };
		});
	},
	view: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, viewSchema, async ({ name }) => {
			await createView(access, event.params.partId, name);
			return { saved: 'view' };
		});
	},
	plan: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, samplingPlanFormSchema, async (input) => {
			await setPlan(access, event.params.partId, input);
			return { saved: 'plan' };
		});
	}
} satisfies Actions;
