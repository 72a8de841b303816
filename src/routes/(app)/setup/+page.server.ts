import { requireRole } from '$lib/server/access';
import { listPartsWithViews, listTools } from '$lib/server/catalogue';
import type { PageServerLoad } from './$types';

export const load = (async (event) => {
	const { org, role } = requireRole(event, 'engineer', 'inspector', 'toolmaker', 'viewer');
	const [parts, tools] = await Promise.all([listPartsWithViews(org.id), listTools(org.id)]);
	return { parts, tools, canEdit: role === 'engineer' || role === 'admin' };
}) satisfies PageServerLoad;
