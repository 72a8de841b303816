import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { getSample } from '$lib/server/samples';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ sample: await getSample(org.id, event.params.sampleId) });
	});
