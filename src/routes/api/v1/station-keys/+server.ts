import { json } from '@sveltejs/kit';
import { stationKeySchema } from '$lib/schemas/station';
import { requireRole } from '$lib/server/access';
import { answer, readJson } from '$lib/server/http';
import { createStationKey, listStationKeys } from '$lib/server/stations';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'admin');
		return json({ keys: await listStationKeys(access) });
	});

// The secret is in this answer only; Stipple keeps its SHA-256.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'admin');
		const input = await readJson(event.request, stationKeySchema);
		return json(await createStationKey(access, input), { status: 201, headers: { 'cache-control': 'no-store' } });
	});
