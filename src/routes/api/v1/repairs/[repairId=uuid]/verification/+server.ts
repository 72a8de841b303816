import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { getRepair, verification } from '$lib/server/repairs';
import type { RequestHandler } from './$types';

// Before against after the repair date, as it stands now.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const r = await getRepair(org.id, event.params.repairId);
		return json({ verification: await verification(org.id, r) });
	});
