import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { getRepair, listRepairPhotos } from '$lib/server/repairs';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		await getRepair(org.id, event.params.repairId);
		return json({ photos: await listRepairPhotos(org.id, event.params.repairId) });
	});
