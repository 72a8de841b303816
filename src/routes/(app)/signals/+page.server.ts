import { requireRole } from '$lib/server/access';
import type { PageServerLoad } from './$types';

export const load = ((event) => {
	requireRole(event, 'engineer');
	return {};
}) satisfies PageServerLoad;
