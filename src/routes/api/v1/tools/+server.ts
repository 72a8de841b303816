import { json } from '@sveltejs/kit';
import { toolSchema } from '$lib/schemas/tool';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { createTool, getTool, listTools } from '$lib/server/tools';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ tools: await listTools(org.id) });
	});

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const input = await readJson(event.request, toolSchema);
		const { id } = await createTool(access, input);
		return json({ tool: await getTool(access.org.id, id) }, { status: 201 });
	});
