import { json } from '@sveltejs/kit';
import { frameMappingSchema } from '$lib/schemas/station';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { getFrameMapping, setFrameMapping } from '$lib/server/stations';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json(await getFrameMapping(org.id, event.params.viewId));
	});

export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, frameMappingSchema);
		return json(await setFrameMapping(access, event.params.viewId, input));
	});
