import { json } from '@sveltejs/kit';
import { correctionQuerySchema } from '$lib/schemas/sample';
import { requireRole } from '$lib/server/access';
import { answer, readUpload, validate } from '$lib/server/http';
import { addPhoto } from '$lib/server/photos';
import type { RequestHandler } from './$types';

// PUT with the image as the body; the id is the client's, so sending it again changes nothing.
export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		const { reason } = validate(correctionQuerySchema, { reason: event.url.searchParams.get('reason') ?? undefined });
		const bytes = await readUpload(event.request);
		const { photo, created } = await addPhoto(access, event.params.pinId, event.params.photoId, bytes, reason);
		return json({ photo }, { status: created ? 201 : 200 });
	});
