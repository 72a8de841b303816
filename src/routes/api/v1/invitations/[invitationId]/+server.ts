import { invitationRefSchema } from '$lib/schemas/team';
import { requireRole } from '$lib/server/access';
import { answer, validate } from '$lib/server/http';
import { cancelInvitation } from '$lib/server/team';
import type { RequestHandler } from './$types';

export const DELETE: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'admin');
		const { invitationId } = validate(invitationRefSchema, event.params);
		await cancelInvitation(access, { headers: event.request.headers, ip: event.getClientAddress() }, invitationId);
		return new Response(null, { status: 204 });
	});
