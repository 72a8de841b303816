import { json } from '@sveltejs/kit';
import { stationSampleSchema } from '$lib/schemas/station';
import { answer, readJson } from '$lib/server/http';
import { postStationSample, stationFromRequest } from '$lib/server/stations';
import type { RequestHandler } from './$types';

// A station signs with its key (Authorization: Bearer stk_…), not a session. The key is checked
// before the body is read, so a stranger learns nothing about the payload's rules.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const key = await stationFromRequest(event.request);
		const input = await readJson(event.request, stationSampleSchema);
		const { sample, created } = await postStationSample(key, input);
		return json({ sample, created }, { status: created ? 201 : 200 });
	});
