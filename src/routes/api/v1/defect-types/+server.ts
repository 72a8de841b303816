import { json } from '@sveltejs/kit';
import { defectTypeCreateSchema } from '$lib/schemas/defect';
import { requireRole } from '$lib/server/access';
import { createDefectType, listDefectTypes } from '$lib/server/defects';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ defectTypes: await listDefectTypes(org.id) });
	});

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, defectTypeCreateSchema);
		return json({ defectType: await createDefectType(access, input) }, { status: 201 });
	});
