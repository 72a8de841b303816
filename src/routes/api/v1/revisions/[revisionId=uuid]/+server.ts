import { json } from '@sveltejs/kit';
import { gridSchema } from '$lib/schemas/drawing';
import { requireRole } from '$lib/server/access';
import { getRevision, setGrid } from '$lib/server/drawings';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ revision: await getRevision(org.id, event.params.revisionId) });
	});

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const grid = await readJson(event.request, gridSchema);
		return json({ revision: await setGrid(access, event.params.revisionId, grid) });
	});
