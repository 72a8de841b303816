import { json } from '@sveltejs/kit';
import { viewSchema } from '$lib/schemas/part';
import { requireRole } from '$lib/server/access';
import { createView, listViews } from '$lib/server/drawings';
import { answer, readJson } from '$lib/server/http';
import { getPart } from '$lib/server/parts';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		await getPart(org.id, event.params.partId);
		return json({ views: await listViews(org.id, event.params.partId) });
	});

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const { name } = await readJson(event.request, viewSchema);
		return json({ view: await createView(access, event.params.partId, name) }, { status: 201 });
	});
