import { json } from '@sveltejs/kit';
import { weightsSchema } from '$lib/schemas/defect';
import { requireRole } from '$lib/server/access';
import { getWeights, setWeights } from '$lib/server/defects';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ weights: await getWeights(org.id) });
	});

export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const weights = await readJson(event.request, weightsSchema);
		await setWeights(access, weights);
		return json({ weights });
	});
