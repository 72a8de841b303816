import { requireRole } from '$lib/server/access';
import { deleteImport } from '$lib/server/history';
import { answer } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const DELETE: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		await deleteImport(access, event.params.importId);
		return new Response(null, { status: 204 });
	});
