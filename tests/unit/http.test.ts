import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { DomainError } from '../../src/lib/server/errors';
import { answer, readJson } from '../../src/lib/server/http';

const schema = z.object({ name: z.string().max(5) });
const req = (body: string, type = 'application/json') =>
	new Request('http://x/api', { method: 'POST', body, headers: { 'content-type': type } });

async function failure(p: Promise<unknown>) {
	return p.then(
		() => {
			throw new Error('expected a DomainError');
		},
		(e: unknown) => {
			if (!(e instanceof DomainError)) throw e;
			return e;
		}
	);
}

describe('readJson', () => {
	it('parses and validates a good body', async () => {
		await expect(readJson(req('{"name":"ab"}'), schema)).resolves.toEqual({ name: 'ab' });
	});

	it('answers 400 to malformed JSON, 415 to another media type, 422 with issues to a bad shape', async () => {
		expect((await failure(readJson(req('{"name":'), schema))).status).toBe(400);
		expect((await failure(readJson(req('name=ab', 'application/x-www-form-urlencoded'), schema))).status).toBe(415);
		const bad = await failure(readJson(req('{"name":"toolong"}'), schema));
		expect(bad.status).toBe(422);
		expect(bad.issues?.[0]?.path).toBe('name');
	});
});

describe('answer', () => {
	it('turns a DomainError into the API error shape', async () => {
		const res = await answer(async () => {
			throw new DomainError(409, 'last_admin', 'Keep one admin.');
		});
		expect(res.status).toBe(409);
		expect(await res.json()).toEqual({ error: { code: 'last_admin', message: 'Keep one admin.' } });
	});

	it('lets other errors through to the server error handler', async () => {
		await expect(
			answer(async () => {
				throw new TypeError('bug');
			})
		).rejects.toThrow(TypeError);
	});
});
