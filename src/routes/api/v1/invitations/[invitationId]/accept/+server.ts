import { json } from '@sveltejs/kit';
import { invitationRefSchema } from '$lib/schemas/team';
import { requireUser } from '$lib/server/access';
import { answer, validate } from '$lib/server/http';
import { acceptInvitation } from '$lib/server/team';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const user = requireUser(event);
		const { invitationId } = validate(invitationRefSchema, event.params);
		const inv = await acceptInvitation(
			{ headers: event.request.headers, ip: event.getClientAddress() },
			user.email,
			invitationId
		);
		return json({ organization: inv.organization, role: inv.role });
	});
