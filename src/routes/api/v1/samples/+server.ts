import { json } from '@sveltejs/kit';
import { startSampleSchema } from '$lib/schemas/sample';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { startSample } from '$lib/server/samples';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		const input = await readJson(event.request, startSampleSchema);
		return json({ sample: await startSample(access, input) }, { status: 201 });
	});
