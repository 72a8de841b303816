import { json } from '@sveltejs/kit';
import { pinSchema } from '$lib/schemas/sample';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { writePin } from '$lib/server/samples';
import type { RequestHandler } from './$types';

// Idempotent by the pin's client-made id: 201 when stored now, 200 when it was stored before.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		const input = await readJson(event.request, pinSchema);
		const { pin, created } = await writePin(access, event.params.sampleId, input);
		return json({ pin }, { status: created ? 201 : 200 });
	});
