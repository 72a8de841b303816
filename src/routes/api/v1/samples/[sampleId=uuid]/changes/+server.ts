import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { historyOf } from '$lib/server/audit';
import { answer } from '$lib/server/http';
import { getSample } from '$lib/server/samples';
import type { RequestHandler } from './$types';

// Corrections made to a sample after it was closed: who, when, what, and why.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		await getSample(org.id, event.params.sampleId); // 404 for another organisation's sample
		return json({ changes: await historyOf(org.id, 'sample', event.params.sampleId) });
	});
