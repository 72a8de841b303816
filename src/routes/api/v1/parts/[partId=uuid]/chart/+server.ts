import { json } from '@sveltejs/kit';
import { chartQuerySchema } from '$lib/schemas/chart';
import { requireRole } from '$lib/server/access';
import { chartFor } from '$lib/server/charts';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(chartQuerySchema, Object.fromEntries(event.url.searchParams));
		return json(await chartFor(org.id, event.params.partId, query));
	});
