import { screensFor } from '$lib/screens';
import { requireRole } from '$lib/server/access';
import type { PageServerLoad } from './$types';

export const load = ((event) => {
	const { role } = requireRole(event);
	return { screens: screensFor(role).map(({ path, label, blurb }) => ({ path, label, blurb })) };
}) satisfies PageServerLoad;
