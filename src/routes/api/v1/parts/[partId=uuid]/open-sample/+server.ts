import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { getPart } from '$lib/server/parts';
import { openSampleOf } from '$lib/server/samples';
import type { RequestHandler } from './$types';

/** The caller's open sample of this part, to resume it; `null` when there is none. */
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		await getPart(access.org.id, event.params.partId);
		return json({ sample: await openSampleOf(access, event.params.partId) });
	});
