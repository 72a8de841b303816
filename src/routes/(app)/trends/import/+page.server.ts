import { requireRole } from '$lib/server/access';
import { importChoices } from '$lib/server/history';
import type { PageServerLoad } from './$types';

export const load = (async (event) => {
	const { org } = requireRole(event, 'engineer');
	const choices = await importChoices(org.id);
	const asked = event.url.searchParams.get('part');
	const selected = choices.parts.some((p) => p.id === asked) ? asked : null;
	return { ...choices, selected };
}) satisfies PageServerLoad;
