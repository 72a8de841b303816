import { error, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { ROLE_LABEL, isRole } from '$lib/roles';
import { authId } from '$lib/schemas/common';
import { requireUser } from '$lib/server/access';
import { DomainError } from '$lib/server/errors';
import { act } from '$lib/server/http';
import { acceptInvitation, invitationPreview } from '$lib/server/team';
import type { Actions, PageServerLoad } from './$types';

export const load = (async ({ params, locals }) => {
	if (!authId.safeParse(params.id).success) error(404, 'This invitation does not exist.');
	try {
		const inv = await invitationPreview(params.id);
		return {
			invitation: {
				id: inv.id,
				email: inv.email,
				role: isRole(inv.role) ? ROLE_LABEL[inv.role] : 'Member',
				organization: inv.organization,
				invitedBy: inv.invitedBy,
				open: inv.status === 'pending' && inv.expiresAt > new Date()
			},
			signedInAs: locals.user?.email ?? null
		};
	} catch (e) {
		if (e instanceof DomainError && e.status === 404) error(404, 'This invitation does not exist.');
		throw e;
	}
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const user = requireUser(event);
		return act(event.request, z.object({}), async () => {
			await acceptInvitation(
				{ headers: event.request.headers, ip: event.getClientAddress() },
				user.email,
				event.params.id
			);
			redirect(303, '/');
		});
	}
} satisfies Actions;
