import { json } from '@sveltejs/kit';
import { repairActionSchema } from '$lib/schemas/repair';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { actOnRepair, getRepair, listRepairPhotos } from '$lib/server/repairs';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const [repair, photos] = await Promise.all([
			getRepair(org.id, event.params.repairId),
			listRepairPhotos(org.id, event.params.repairId)
		]);
		return json({ repair, photos });
	});

// The next step: accept, done (repair date, work done), verified or not_verified.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer', 'toolmaker');
		const input = await readJson(event.request, repairActionSchema);
		return json({ repair: await actOnRepair(access, event.params.repairId, input) });
	});
