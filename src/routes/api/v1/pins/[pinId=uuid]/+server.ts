import { json } from '@sveltejs/kit';
import { correctionQuerySchema, pinPatchSchema } from '$lib/schemas/sample';
import { requireRole } from '$lib/server/access';
import { answer, readJson, validate } from '$lib/server/http';
import { deletePin, updatePin } from '$lib/server/samples';
import type { RequestHandler } from './$types';

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		const patch = await readJson(event.request, pinPatchSchema);
		return json({ pin: await updatePin(access, event.params.pinId, patch) });
	});

// DELETE takes its reason (needed once the sample is closed) from the query: ?reason=…
export const DELETE: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		const { reason } = validate(correctionQuerySchema, { reason: event.url.searchParams.get('reason') ?? undefined });
		await deletePin(access, event.params.pinId, reason);
		return new Response(null, { status: 204 });
	});
