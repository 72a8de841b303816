import { redirect } from '@sveltejs/kit';
import { switchOrganisationSchema } from '$lib/schemas/team';
import { requireUser } from '$lib/server/access';
import { act } from '$lib/server/http';
import { switchOrganisation } from '$lib/server/orgs';
import type { Actions, PageServerLoad } from './$types';

export const load = (() => redirect(303, '/')) satisfies PageServerLoad;

export const actions = {
	switch: async (event) => {
		const user = requireUser(event);
		return act(event.request, switchOrganisationSchema, async ({ organizationId }) => {
			await switchOrganisation(
				{ headers: event.request.headers, ip: event.getClientAddress() },
				user.id,
				organizationId
			);
			redirect(303, '/');
		});
	}
} satisfies Actions;
