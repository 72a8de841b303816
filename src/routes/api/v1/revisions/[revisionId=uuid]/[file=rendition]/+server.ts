import { requireRole } from '$lib/server/access';
import { revisionImage } from '$lib/server/drawings';
import { answer } from '$lib/server/http';
import type { RequestHandler } from './$types';

// Drawings reach the browser only through this access-checked route, never from the bucket.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const variant = event.params.file === 'display.webp' ? 'display' : 'thumb';
		const image = await revisionImage(org.id, event.params.revisionId, variant);
		return new Response(image.body, {
			headers: {
				'content-type': image.contentType,
				...(image.length ? { 'content-length': String(image.length) } : {}),
				// A revision's image never changes; a new upload is a new revision with a new id.
				'cache-control': 'private, max-age=31536000, immutable'
			}
		});
	});
