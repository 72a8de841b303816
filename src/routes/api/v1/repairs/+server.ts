import { json } from '@sveltejs/kit';
import { repairListSchema, repairSchema } from '$lib/schemas/repair';
import { requireRole } from '$lib/server/access';
import { answer, readJson, validate } from '$lib/server/http';
import { createRepair, listRepairs } from '$lib/server/repairs';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event);
		const query = validate(repairListSchema, Object.fromEntries(event.url.searchParams));
		return json({ repairs: await listRepairs(access, query) });
	});

export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer', 'toolmaker');
		const input = await readJson(event.request, repairSchema);
		return json({ repair: await createRepair(access, input) }, { status: 201 });
	});
