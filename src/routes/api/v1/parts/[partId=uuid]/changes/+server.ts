import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { historyOf } from '$lib/server/audit';
import { answer } from '$lib/server/http';
import { getPart } from '$lib/server/parts';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		await getPart(org.id, event.params.partId);
		return json({ changes: await historyOf(org.id, 'part', event.params.partId) });
	});
