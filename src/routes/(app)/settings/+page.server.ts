import { digestFormSchema } from '$lib/schemas/settings';
import { requireRole } from '$lib/server/access';
import { digestChoices, setDigests } from '$lib/server/digest';
import { act } from '$lib/server/http';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const access = requireRole(event);
	return { email: access.user.email, parts: await digestChoices(access) };
}) satisfies PageServerLoad;

export const actions = {
	digest: async (event) => {
		const access = requireRole(event);
		return act(event.request, digestFormSchema, async ({ partIds }) => {
			const saved = await setDigests(access, partIds);
			return { saved: saved.length };
		});
	}
} satisfies Actions;
