import { requireRole } from '$lib/server/access';
import type { PageServerLoad } from './$types';

export const load = ((event) => {
	requireRole(event, 'toolmaker', 'engineer', 'viewer');
	return {};
}) satisfies PageServerLoad;
