import { json } from '@sveltejs/kit';
import { partQuerySchema, partSchema } from '$lib/schemas/part';
import { requireRole } from '$lib/server/access';
import { answer, readJson, validate } from '$lib/server/http';
import { createPart, listParts } from '$lib/server/parts';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(partQuerySchema, Object.fromEntries(event.url.searchParams));
		return json(await listParts(org.id, query));
	});

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, partSchema);
		return json({ part: await createPart(access, input) }, { status: 201 });
	});
