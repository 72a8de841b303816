import { densityQueryOf, densityQuerySchema } from '$lib/schemas/density';
import { requireRole } from '$lib/server/access';
import { densityPng } from '$lib/server/density';
import { answer, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// The density map over the drawing, as an image to put in a report.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(densityQuerySchema, densityQueryOf(event.url.searchParams));
		const png = await densityPng(org.id, event.params.viewId, query);
		return new Response(new Uint8Array(png), {
			headers: {
				'content-type': 'image/png',
				'content-disposition': 'attachment; filename="density.png"',
				'cache-control': 'private, no-store'
			}
		});
	});
