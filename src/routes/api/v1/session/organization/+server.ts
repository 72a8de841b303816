import { json } from '@sveltejs/kit';
import { switchOrganisationSchema } from '$lib/schemas/team';
import { requireUser } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { switchOrganisation } from '$lib/server/orgs';
import type { RequestHandler } from './$types';

export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const user = requireUser(event);
		const { organizationId } = await readJson(event.request, switchOrganisationSchema);
		await switchOrganisation({ headers: event.request.headers, ip: event.getClientAddress() }, user.id, organizationId);
		return json({ organizationId });
	});
