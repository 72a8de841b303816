import { json } from '@sveltejs/kit';
import { locateQuerySchema } from '$lib/schemas/drawing';
import { requireRole } from '$lib/server/access';
import { locate } from '$lib/server/drawings';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const { x, y } = validate(locateQuerySchema, Object.fromEntries(event.url.searchParams));
		return json(await locate(org.id, event.params.revisionId, [x, y]));
	});
