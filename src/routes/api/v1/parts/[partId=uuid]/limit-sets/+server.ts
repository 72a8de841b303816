import { json } from '@sveltejs/kit';
import { limitSetSchema } from '$lib/schemas/chart';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { createLimitSet, listLimitSets } from '$lib/server/limits';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ limitSets: await listLimitSets(org.id, event.params.partId) });
	});

// Trial limits from a period or chosen samples, less the exclusions; freeze them with POST …/freeze.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, limitSetSchema);
		return json({ limitSet: await createLimitSet(access, event.params.partId, input) }, { status: 201 });
	});
