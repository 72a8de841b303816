import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { repairPhotoImage } from '$lib/server/repairs';
import type { RequestHandler } from './$types';

// Photos reach the browser only through this access-checked route, never from the bucket.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const variant = event.params.file === 'display.webp' ? 'display' : 'thumb';
		const image = await repairPhotoImage(org.id, event.params.repairId, event.params.photoId, variant);
		return new Response(image.body, {
			headers: {
				'content-type': image.contentType,
				...(image.length ? { 'content-length': String(image.length) } : {}),
				'cache-control': 'private, max-age=31536000, immutable'
			}
		});
	});
