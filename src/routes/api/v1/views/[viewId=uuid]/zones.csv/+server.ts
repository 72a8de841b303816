import { densityQueryOf, densityQuerySchema } from '$lib/schemas/density';
import { requireRole } from '$lib/server/access';
import { zonesCsv } from '$lib/server/density';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// The zone ranking as CSV (UTF-8 with a BOM, so spreadsheets read it as UTF-8).
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(densityQuerySchema, densityQueryOf(event.url.searchParams));
		const csv = await zonesCsv(org.id, event.params.viewId, query);
		return new Response(`\uFEFF${csv}\r\n`, {
			headers: {
				'content-type': 'text/csv; charset=utf-8',
				'content-disposition': 'attachment; filename="zones.csv"',
				'cache-control': 'private, no-store'
			}
		});
	});
