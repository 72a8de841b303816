import { json } from '@sveltejs/kit';
import { partPatchSchema } from '$lib/schemas/part';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { getPart, updatePart } from '$lib/server/parts';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ part: await getPart(org.id, event.params.partId) });
	});

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const patch = await readJson(event.request, partPatchSchema);
		return json({ part: await updatePart(access, event.params.partId, patch) });
	});
