import { json } from '@sveltejs/kit';
import { regionPatchSchema } from '$lib/schemas/drawing';
import { requireRole } from '$lib/server/access';
import { deleteRegion, updateRegion } from '$lib/server/drawings';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const patch = await readJson(event.request, regionPatchSchema);
		return json({ region: await updateRegion(access, event.params.regionId, patch) });
	});

export const DELETE: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		await deleteRegion(access, event.params.regionId);
		return new Response(null, { status: 204 });
	});
