import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { evidencePng } from '$lib/server/repairs';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const png = await evidencePng(org.id, event.params.repairId);
		return new Response(new Uint8Array(png), {
			headers: { 'content-type': 'image/png', 'cache-control': 'private, max-age=31536000, immutable' }
		});
	});
