import { json } from '@sveltejs/kit';
import { signalActionSchema } from '$lib/schemas/signal';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { actOnSignal, getSignal } from '$lib/server/signals';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ signal: await getSignal(org.id, event.params.signalId) });
	});

// Acknowledge, explain (cause and action taken) or close.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, signalActionSchema);
		return json({ signal: await actOnSignal(access, event.params.signalId, input) });
	});
