import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { closeSample } from '$lib/server/samples';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		return json(await closeSample(access, event.params.sampleId));
	});
