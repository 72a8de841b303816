import { json } from '@sveltejs/kit';
import { digestSettingsSchema } from '$lib/schemas/settings';
import { requireRole } from '$lib/server/access';
import { myDigests, setDigests } from '$lib/server/digest';
import { answer, readJson } from '$lib/server/http';
import type { RequestHandler } from './$types';

// Any member may get a digest: viewers (managers) read it most.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event);
		return json({ partIds: await myDigests(access) });
	});

export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event);
		const { partIds } = await readJson(event.request, digestSettingsSchema);
		return json({ partIds: await setDigests(access, partIds) });
	});
