import { json } from '@sveltejs/kit';
import { limitSetPatchSchema } from '$lib/schemas/chart';
import { requireRole } from '$lib/server/access';
import { getLimitSet } from '$lib/server/charts';
import { answer, readJson } from '$lib/server/http';
import { updateLimitSet } from '$lib/server/limits';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ limitSet: await getLimitSet(org.id, event.params.limitSetId) });
	});

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const patch = await readJson(event.request, limitSetPatchSchema);
		return json({ limitSet: await updateLimitSet(access, event.params.limitSetId, patch) });
	});
