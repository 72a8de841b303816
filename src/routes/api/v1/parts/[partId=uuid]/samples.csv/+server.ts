import { exportQuerySchema } from '$lib/schemas/export';
import { requireRole } from '$lib/server/access';
import { samplesCsv, csvResponse } from '$lib/server/exports';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// One row per closed sample under the Trends filters, with its pins per defect type; streamed.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(exportQuerySchema, Object.fromEntries(event.url.searchParams));
		return csvResponse(await samplesCsv(org.id, event.params.partId, query));
	});
