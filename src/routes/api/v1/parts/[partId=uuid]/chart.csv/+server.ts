import { exportQuerySchema } from '$lib/schemas/export';
import { requireRole } from '$lib/server/access';
import { chartCsv, csvResponse } from '$lib/server/exports';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// The chart's points as the chart endpoint computes them, with the limits in force at each.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(exportQuerySchema, Object.fromEntries(event.url.searchParams));
		return csvResponse(await chartCsv(org.id, event.params.partId, query));
	});
