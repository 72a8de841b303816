import { json } from '@sveltejs/kit';
import { requireUser } from '$lib/server/access';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const user = requireUser(event);
	const { org, role } = event.locals;
	return json({ user, organization: org, role });
};
