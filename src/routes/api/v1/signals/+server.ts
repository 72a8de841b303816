import { json } from '@sveltejs/kit';
import { signalListSchema } from '$lib/schemas/signal';
import { requireRole } from '$lib/server/access';
import { answer, validate } from '$lib/server/http';
import { listSignals } from '$lib/server/signals';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const query = validate(signalListSchema, Object.fromEntries(event.url.searchParams));
		return json({ signals: await listSignals(org.id, query) });
	});
