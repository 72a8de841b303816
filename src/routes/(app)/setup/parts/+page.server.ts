import { redirect } from '@sveltejs/kit';
import { partQuerySchema, partSchema } from '$lib/schemas/part';
import { requireRole } from '$lib/server/access';
import { act } from '$lib/server/http';
import { createPart, listParts } from '$lib/server/parts';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const { org, role } = requireRole(event, 'engineer', 'inspector', 'toolmaker', 'viewer');
	const parsed = partQuerySchema.safeParse(Object.fromEntries(event.url.searchParams));
	const query = parsed.success ? parsed.data : partQuerySchema.parse({});
	return { ...(await listParts(org.id, query)), query, canEdit: role === 'engineer' || role === 'admin' };
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, partSchema, async (input) => {
			const part = await createPart(access, input);
			redirect(303, `/setup/parts/${part.id}`);
		});
	}
} satisfies Actions;
