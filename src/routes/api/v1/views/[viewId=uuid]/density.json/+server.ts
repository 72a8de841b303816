import { json } from '@sveltejs/kit';
import { densityQueryOf, densityQuerySchema } from '$lib/schemas/density';
import { requireRole } from '$lib/server/access';
import { densityOf } from '$lib/server/density';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// The density map of a view, as a grid: binned in SQL, smoothed, per 100 units inspected.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(densityQuerySchema, densityQueryOf(event.url.searchParams));
		return json(await densityOf(org.id, event.params.viewId, query));
	});
