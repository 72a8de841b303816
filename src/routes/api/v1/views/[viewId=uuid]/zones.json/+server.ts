import { json } from '@sveltejs/kit';
import { densityQueryOf, densityQuerySchema } from '$lib/schemas/density';
import { requireRole } from '$lib/server/access';
import { zonesOf } from '$lib/server/density';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// Zone ranking of a view: per grid zone and region against uniform-by-area, chi-square, Clark–Evans.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(densityQuerySchema, densityQueryOf(event.url.searchParams));
		return json(await zonesOf(org.id, event.params.viewId, query));
	});
