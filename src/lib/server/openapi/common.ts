/** Pieces every part of the OpenAPI document uses: the error shape, the standard answers, an operation. */
import { z } from 'zod';
import type { ZodOpenApiOperationObject } from 'zod-openapi';

export const errorBody = z
	.object({
		error: z.object({
			code: z.string().meta({ example: 'invalid' }),
			message: z.string().meta({ example: 'Some fields are missing or wrong.' }),
			issues: z.array(z.object({ path: z.string(), message: z.string() })).optional()
		})
	})
	.meta({ id: 'Error', description: 'Every 4xx answer has this shape.' });

export const anyJson = (description: string) => ({
	description,
	content: { 'application/json': { schema: z.object({}).catchall(z.unknown()) } }
});
export const errors = {
	'400': { description: 'Malformed body', content: { 'application/json': { schema: errorBody } } },
	'401': { description: 'Not signed in', content: { 'application/json': { schema: errorBody } } },
	'403': { description: 'Your role does not allow this', content: { 'application/json': { schema: errorBody } } },
	'404': {
		description: 'Not found (or another organisation’s)',
		content: { 'application/json': { schema: errorBody } }
	},
	'409': { description: 'Conflicts with the current state', content: { 'application/json': { schema: errorBody } } },
	'422': { description: 'Invalid input, with issues', content: { 'application/json': { schema: errorBody } } }
};
export const json = (schema: z.ZodType) => ({ content: { 'application/json': { schema } } });
export const id = (name: string) => z.object({ [name]: z.uuid() });

export function op(
	summary: string,
	tags: string[],
	extra: Omit<ZodOpenApiOperationObject, 'responses' | 'summary'> = {},
	ok: { status?: string; description?: string } = {}
): ZodOpenApiOperationObject {
	return {
		summary,
		tags,
		...extra,
		responses: { [ok.status ?? '200']: anyJson(ok.description ?? 'OK'), ...errors }
	};
}

export const image = {
	content: {
		'image/png': { schema: z.string().meta({ format: 'binary' }) },
		'image/jpeg': { schema: z.string().meta({ format: 'binary' }) },
		'image/webp': { schema: z.string().meta({ format: 'binary' }) }
	}
};
