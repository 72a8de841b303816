import { json } from '@sveltejs/kit';
import { inviteSchema } from '$lib/schemas/team';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { invite, listPendingInvitations } from '$lib/server/team';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const { org } = requireRole(event, 'admin');
	return json({ invitations: await listPendingInvitations(org.id) });
};

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'admin');
		const input = await readJson(event.request, inviteSchema);
		const sent = await invite(access, { headers: event.request.headers, ip: event.getClientAddress() }, input);
		return json({ invitation: sent }, { status: 201 });
	});
