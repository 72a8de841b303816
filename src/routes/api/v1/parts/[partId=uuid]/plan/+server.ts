import { json } from '@sveltejs/kit';
import { samplingPlanSchema } from '$lib/schemas/plan';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { getPlan, setPlan } from '$lib/server/plans';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ plan: await getPlan(org.id, event.params.partId) });
	});

export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, samplingPlanSchema);
		return json({ plan: await setPlan(access, event.params.partId, input) });
	});
