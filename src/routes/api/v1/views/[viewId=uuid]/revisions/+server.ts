import { json } from '@sveltejs/kit';
import { revisionNoteSchema } from '$lib/schemas/drawing';
import { requireRole } from '$lib/server/access';
import { addRevision } from '$lib/server/drawings';
import { answer, readUpload, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

// The body is the image itself (any content type: the server reads the real type from the bytes).
// A PDF is rendered to an image in the browser first; the server never opens PDFs.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const { note } = validate(revisionNoteSchema, { note: event.url.searchParams.get('note') ?? undefined });
		const bytes = await readUpload(event.request);
		return json({ revision: await addRevision(access, event.params.viewId, bytes, note) }, { status: 201 });
	});
