import { changeRoleFormSchema, invitationRefSchema, inviteSchema, memberRefSchema } from '$lib/schemas/team';
import { requireRole } from '$lib/server/access';
import { act } from '$lib/server/http';
import {
	cancelInvitation,
	changeRole,
	invite,
	listMembers,
	listPendingInvitations,
	removeMember
} from '$lib/server/team';
import type { Actions, PageServerLoad, RequestEvent } from './$types';

export const load = (async (event) => {
	const { org, user } = requireRole(event, 'admin');
	const [members, invitations] = await Promise.all([listMembers(org.id), listPendingInvitations(org.id)]);
	return {
		me: user.id,
		members: members.map(({ id, userId, name, email, role, since }) => ({ id, userId, name, email, role, since })),
		invitations
	};
}) satisfies PageServerLoad;

const caller = (event: RequestEvent) => ({ headers: event.request.headers, ip: event.getClientAddress() });

export const actions = {
	invite: async (event) => {
		const access = requireRole(event, 'admin');
		return act(event.request, inviteSchema, async (input) => {
			const sent = await invite(access, caller(event), input);
			return { invited: sent.email };
		});
	},
	role: async (event) => {
		const access = requireRole(event, 'admin');
		return act(event.request, changeRoleFormSchema, async ({ memberId, role }) => {
			await changeRole(access, memberId, role);
			return { changed: memberId };
		});
	},
	remove: async (event) => {
		const access = requireRole(event, 'admin');
		return act(event.request, memberRefSchema, async ({ memberId }) => {
			await removeMember(access, memberId);
			return { removed: memberId };
		});
	},
	cancel: async (event) => {
		const access = requireRole(event, 'admin');
		return act(event.request, invitationRefSchema, async ({ invitationId }) => {
			await cancelInvitation(access, caller(event), invitationId);
			return { cancelled: invitationId };
		});
	}
} satisfies Actions;
