import { json } from '@sveltejs/kit';
import { reorderSchema } from '$lib/schemas/defect';
import { requireRole } from '$lib/server/access';
import { reorderDefectTypes } from '$lib/server/defects';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const { ids } = await readJson(event.request, reorderSchema);
		await reorderDefectTypes(access, ids);
		return json({ ids });
	});
