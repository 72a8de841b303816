import { z } from 'zod';
import { toolEditFormSchema, toolFormSchema } from '$lib/schemas/tool';
import { requireRole } from '$lib/server/access';
import { historyOf } from '$lib/server/audit';
import { act } from '$lib/server/http';
import { activeParts } from '$lib/server/parts';
import { createTool, listTools, updateTool } from '$lib/server/tools';
import { readable } from '$lib/history-words';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const { org, role } = requireRole(event, 'engineer', 'inspector', 'toolmaker', 'viewer');
	const [tools, parts] = await Promise.all([listTools(org.id), activeParts(org.id)]);
	const asked = z.uuid().safeParse(event.url.searchParams.get('history'));
	const historyId = asked.success && tools.some((t) => t.id === asked.data) ? asked.data : null;
	const names = {
		parts: new Map([
			...tools.flatMap((t) => t.partIds.map((id, i): [string, string] => [id, t.parts[i] ?? id])),
			...parts.map((p): [string, string] => [p.id, p.number])
		])
	};
	const history = historyId ? readable(await historyOf(org.id, 'tool', historyId), names) : [];
	return { tools, parts, historyId, history, canEdit: role === 'engineer' || role === 'admin' };
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, toolFormSchema, async (input) => {
			await createTool(access, input);
			return { created: input.code };
		});
	},
	update: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, toolEditFormSchema, async ({ toolId, ...patch }) => {
			const saved = await updateTool(access, toolId, patch);
			return { updated: saved.code };
		});
	}
} satisfies Actions;
