import { redirect } from '@sveltejs/kit';
import { organisationSchema } from '$lib/schemas/team';
import { requireUser } from '$lib/server/access';
import { act } from '$lib/server/http';
import { createOrganisation } from '$lib/server/orgs';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	if (!event.locals.user) redirect(303, '/sign-in?redirectTo=/welcome');
	return { name: event.locals.user.name, hasOrg: Boolean(event.locals.org) };
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		requireUser(event);
		return act(event.request, organisationSchema, async (input) => {
			await createOrganisation({ headers: event.request.headers, ip: event.getClientAddress() }, input);
			redirect(303, '/team');
		});
	}
} satisfies Actions;
