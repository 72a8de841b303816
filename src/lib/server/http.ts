/** Turning requests into typed input and domain errors into 4xx answers. */
import { error, fail, json } from '@sveltejs/kit';
import type { z } from 'zod';
import { issuesOf, unfit, type Issues } from '$lib/schemas/common';
import { isDatabaseUnavailable } from './db';
import { DomainError } from './errors';
import { IMAGE_LIMITS } from './images';

export interface ErrorBody {
	error: { code: string; message: string; issues?: Issues };
}

export const CODE_FOR_STATUS: Record<number, string> = {
	400: 'bad_request',
	401: 'unauthenticated',
	403: 'forbidden',
	404: 'not_found',
	405: 'method_not_allowed',
	409: 'conflict',
	413: 'too_large',
	415: 'unsupported_media_type',
	422: 'invalid',
	429: 'rate_limited',
	503: 'unavailable'
};

/** What a request gets while the database is down or restarting; nothing was written. */
export function unavailable(): Response {
	const response = jsonError(503, 'Stipple cannot reach its database just now; try again in a moment.');
	response.headers.set('retry-after', '2');
	return response;
}

export function jsonError(status: number, message: string, code?: string, issues?: Issues) {
	const body: ErrorBody = {
		error: { code: code ?? CODE_FOR_STATUS[status] ?? 'error', message, ...(issues ? { issues } : {}) }
	};
	return json(body, { status });
}

/** Reads a JSON body and validates it; throws DomainError 400/415/422 with what is wrong. */
export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
	const type = request.headers.get('content-type') ?? '';
	if (!type.toLowerCase().startsWith('application/json')) {
		throw new DomainError(415, 'unsupported_media_type', 'Send the body as application/json.');
	}
	let raw: unknown;
	try {
		raw = await request.json();
	} catch {
		throw new DomainError(400, 'bad_json', 'The body is not valid JSON.');
	}
	return validate(schema, raw);
}

const NUL_MESSAGE = 'Text cannot hold the NUL character (U+0000).';

export function validate<S extends z.ZodType>(schema: S, raw: unknown): z.infer<S> {
	const bad = unfit(raw);
	if (bad && 'tooDeep' in bad) throw new DomainError(400, 'bad_json', 'The input nests deeper than any request needs.');
	if (bad)
		throw new DomainError(422, 'invalid', 'Some fields are missing or wrong.', [
			{ path: bad.nul, message: NUL_MESSAGE }
		]);
	const parsed = schema.safeParse(raw);
	if (!parsed.success) {
		throw new DomainError(422, 'invalid', 'Some fields are missing or wrong.', issuesOf(parsed.error));
	}
	return parsed.data;
}

/** Runs an endpoint body, answering domain errors in the API's error shape. */
export async function answer(fn: () => Promise<Response>): Promise<Response> {
	try {
		return await fn();
	} catch (e) {
		if (e instanceof DomainError) return jsonError(e.status, e.message, e.code, e.issues);
		if (isDatabaseUnavailable(e)) return unavailable();
		throw e;
	}
}

const SECRET_FIELDS = new Set(['password', 'confirm', 'currentPassword']);

/**
 * Runs a form action: parses the form with `schema`, calls `fn`, and turns a bad form or a
 * domain error into `fail(status, { message, issues, values })` for the page to show.
 */
export async function act<S extends z.ZodType, R>(
	request: Request,
	schema: S,
	fn: (data: z.infer<S>, form: FormData) => Promise<R>
) {
	let form: FormData;
	try {
		form = await request.formData();
	} catch {
		return fail(400, {
			message: 'The form could not be read. Reload the page and try again.',
			issues: [] as Issues,
			values: {} as Record<string, string>
		});
	}
	// A name sent more than once (a group of checkboxes) becomes a list.
	const raw: Record<string, string | string[]> = {};
	for (const [k, v] of form) {
		if (typeof v !== 'string') continue;
		const seen = raw[k];
		raw[k] = seen === undefined ? v : Array.isArray(seen) ? [...seen, v] : [seen, v];
	}
	const values = Object.fromEntries(
		Object.entries(raw)
			.filter(([k]) => !SECRET_FIELDS.has(k))
			.map(([k, v]) => [k, Array.isArray(v) ? v.join(', ') : v])
	);
	const bad = unfit(raw);
	if (bad && 'nul' in bad) {
		const issues = [{ path: bad.nul, message: NUL_MESSAGE }];
		return fail(400, { message: 'Please check the fields marked below.', issues, values });
	}
	const parsed = schema.safeParse(raw);
	if (!parsed.success) {
		return fail(400, { message: 'Please check the fields marked below.', issues: issuesOf(parsed.error), values });
	}
	try {
		return await fn(parsed.data, form);
	} catch (e) {
		if (e instanceof DomainError) return fail(e.status, { message: e.message, issues: e.issues ?? [], values });
		throw e;
	}
}

/**
 * The files sent under `name` in a form. An empty file input sends one empty file without a name:
 * left out. A chosen file that is empty is kept, so the verb refuses it.
 */
export async function formFiles(form: FormData, name: string): Promise<Buffer[]> {
	const files = form.getAll(name).filter((v): v is File => typeof v !== 'string' && (v.size > 0 || v.name !== ''));
	return Promise.all(files.map(async (f) => Buffer.from(await f.arrayBuffer())));
}

/** Reads an upload body, refusing it as soon as it passes `maxBytes` (with or without Content-Length). */
export async function readUpload(request: Request, maxBytes = IMAGE_LIMITS.maxBytes): Promise<Buffer> {
	const tooLarge = () =>
		new DomainError(413, 'too_large', `The file is over ${Math.round(maxBytes / 1024 / 1024)} MB.`);
	const declared = Number(request.headers.get('content-length') ?? NaN);
	if (declared > maxBytes) throw tooLarge();
	if (!request.body) throw new DomainError(422, 'empty_file', 'The file is empty.');
	const chunks: Uint8Array[] = [];
	let total = 0;
	const reader = request.body.getReader();
	for (;;) {
		const { done, value } = await reader.read();
		if (done) break;
		total += value.byteLength;
		if (total > maxBytes) {
			await reader.cancel();
			throw tooLarge();
		}
		chunks.push(value);
	}
	return Buffer.concat(chunks);
}

/**
 * Wraps a page's load: a DomainError (another organisation's object is "not found") becomes the
 * error page with its own status and words, not a 500.
 */
export function pageLoad<E, R>(load: (event: E) => Promise<R>): (event: E) => Promise<R> {
	return async (event) => {
		try {
			return await load(event);
		} catch (e) {
			if (e instanceof DomainError) error(e.status, e.message);
			throw e;
		}
	};
}
