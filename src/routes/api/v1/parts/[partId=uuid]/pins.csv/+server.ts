import { exportQuerySchema } from '$lib/schemas/export';
import { requireRole } from '$lib/server/access';
import { pinsCsv, csvResponse } from '$lib/server/exports';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// One row per live pin of the closed samples under the Trends filters, streamed from a cursor.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(exportQuerySchema, Object.fromEntries(event.url.searchParams));
		return csvResponse(await pinsCsv(org.id, event.params.partId, query));
	});
