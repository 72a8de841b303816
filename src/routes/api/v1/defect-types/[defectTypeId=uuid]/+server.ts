import { json } from '@sveltejs/kit';
import { defectTypePatchSchema } from '$lib/schemas/defect';
import { requireRole } from '$lib/server/access';
import { updateDefectType } from '$lib/server/defects';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const patch = await readJson(event.request, defectTypePatchSchema);
		return json({ defectType: await updateDefectType(access, event.params.defectTypeId, patch) });
	});
