import { json } from '@sveltejs/kit';
import { organisationSchema } from '$lib/schemas/team';
import { requireUser } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { createOrganisation, myOrganisations } from '$lib/server/orgs';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const user = requireUser(event);
	return json({ organizations: await myOrganisations(user.id) });
};

export const POST: RequestHandler = (event) =>
	answer(async () => {
		requireUser(event);
		const input = await readJson(event.request, organisationSchema);
		const org = await createOrganisation({ headers: event.request.headers, ip: event.getClientAddress() }, input);
		return json({ organization: org }, { status: 201 });
	});
