import { json } from '@sveltejs/kit';
import { densityQueryOf, densityQuerySchema } from '$lib/schemas/density';
import { requireRole } from '$lib/server/access';
import { pinsOf } from '$lib/server/density';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// The newest pins of a view under the filters (at most 5,000), to draw over the density map.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(densityQuerySchema, densityQueryOf(event.url.searchParams));
		return json(await pinsOf(org.id, event.params.viewId, query));
	});
