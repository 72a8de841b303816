import { json } from '@sveltejs/kit';
import { regionSchema } from '$lib/schemas/drawing';
import { requireRole } from '$lib/server/access';
import { addRegion, getRevision } from '$lib/server/drawings';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ regions: (await getRevision(org.id, event.params.revisionId)).regions });
	});

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, regionSchema);
		return json({ region: await addRegion(access, event.params.revisionId, input) }, { status: 201 });
	});
