import { correctionQuerySchema } from '$lib/schemas/sample';
import { requireRole } from '$lib/server/access';
import { answer, validate } from '$lib/server/http';
import { removePhoto } from '$lib/server/photos';
import type { RequestHandler } from './$types';

export const DELETE: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'inspector', 'engineer');
		const { reason } = validate(correctionQuerySchema, { reason: event.url.searchParams.get('reason') ?? undefined });
		await removePhoto(access, event.params.photoId, reason);
		return new Response(null, { status: 204 });
	});
