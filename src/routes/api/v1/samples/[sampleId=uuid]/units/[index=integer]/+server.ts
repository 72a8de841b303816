import { json } from '@sveltejs/kit';
import { unitPatchSchema } from '$lib/schemas/sample';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { updateUnit } from '$lib/server/samples';
import type { RequestHandler } from './$types';

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		const patch = await readJson(event.request, unitPatchSchema);
		return json({ sample: await updateUnit(access, event.params.sampleId, Number(event.params.index), patch) });
	});
