import { gridSchema } from '$lib/schemas/drawing';
import { requireRole } from '$lib/server/access';
import { historyOf } from '$lib/server/audit';
import { getRevision, setGrid } from '$lib/server/drawings';
import { act, pageLoad } from '$lib/server/http';
import { getPart } from '$lib/server/parts';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';

export const load = pageLoad(async (event) => {
	const { org, role } = requireRole(event, 'engineer', 'inspector', 'toolmaker', 'viewer');
	const revision = await getRevision(org.id, event.params.revisionId);
	const [part, history] = await Promise.all([
		getPart(org.id, revision.partId),
		historyOf(org.id, 'revision', revision.id)
	]);
	return {
		revision,
		part: { id: part.id, number: part.number, name: part.name },
		history,
		canEdit: role === 'engineer' || role === 'admin'
	};
}) satisfies PageServerLoad;

// Empty fields mean "no grid".
const gridFormSchema = z.preprocess((raw) => {
	const v = (raw ?? {}) as Record<string, unknown>;
	const none = v.clear === 'true';
	return { columns: none || v.columns === '' ? null : v.columns, rows: none || v.rows === '' ? null : v.rows };
}, gridSchema);

export const actions = {
	grid: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, gridFormSchema, async (grid) => {
			await setGrid(access, event.params.revisionId, grid);
			return { saved: 'grid' };
		});
	}
} satisfies Actions;
