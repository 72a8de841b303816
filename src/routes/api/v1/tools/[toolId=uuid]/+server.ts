import { json } from '@sveltejs/kit';
import { toolPatchSchema } from '$lib/schemas/tool';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { getTool, updateTool } from '$lib/server/tools';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ tool: await getTool(org.id, event.params.toolId) });
	});

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const patch = await readJson(event.request, toolPatchSchema);
		return json({ tool: await updateTool(access, event.params.toolId, patch) });
	});
