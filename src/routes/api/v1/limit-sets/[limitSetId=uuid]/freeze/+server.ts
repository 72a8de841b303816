import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { freezeLimitSet } from '$lib/server/limits';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		return json({ limitSet: await freezeLimitSet(access, event.params.limitSetId) });
	});
