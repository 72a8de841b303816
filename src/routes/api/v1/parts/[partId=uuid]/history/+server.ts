import { json } from '@sveltejs/kit';
import { HISTORY_LIMITS, historyUploadQuerySchema } from '$lib/schemas/history';
import { requireRole } from '$lib/server/access';
import { DomainError } from '$lib/server/errors';
import { importHistory, listImports } from '$lib/server/history';
import { answer, readUpload, validate } from '$lib/server/http';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		return json({ imports: await listImports(org.id, event.params.partId) });
	});

// The body is the CSV file itself; `?name=` is its file name, kept for the list of imports.
export const POST: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer');
		const type = (event.request.headers.get('content-type') ?? '').toLowerCase();
		if (!type.startsWith('text/csv')) {
			throw new DomainError(415, 'unsupported_media_type', 'Send the file as text/csv.');
		}
		const { name } = validate(historyUploadQuerySchema, { name: event.url.searchParams.get('name') ?? undefined });
		const bytes = await readUpload(event.request, HISTORY_LIMITS.maxBytes);
		const notUtf8 = () =>
			new DomainError(422, 'not_utf8', 'The file is not UTF-8 text. Save it as “CSV UTF-8” and try again.');
		let text: string;
		try {
			// TextDecoder drops a byte-order mark (spreadsheets like to write one).
			text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
		} catch {
			throw notUtf8();
		}
		// NUL characters in text: UTF-16 without a byte-order mark, most likely.
		if (text.includes('\0')) throw notUtf8();
		return json(await importHistory(access, event.params.partId, text, name), { status: 201 });
	});
