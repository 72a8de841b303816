import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { listMembers } from '$lib/server/team';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const { org } = requireRole(event, 'admin');
	return json({ members: await listMembers(org.id) });
};
