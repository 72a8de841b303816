/** The weekly digest settings of the signed-in member. */
import { z } from 'zod';
import type { ZodOpenApiPathsObject } from 'zod-openapi';
import { digestSettingsSchema } from '$lib/schemas/settings';
import { errors, json } from './common';

const answer = {
	description: 'The parts whose weekly digest you get, in this organisation',
	...json(z.object({ partIds: z.array(z.uuid()) }))
};

export const digestPaths: ZodOpenApiPathsObject = {
	'/me/digests': {
		get: {
			summary: 'The parts whose weekly digest you get',
			tags: ['Settings'],
			responses: { '200': answer, ...errors }
		},
		put: {
			summary:
				'Choose the parts whose weekly digest you get (any member; the list replaces the old one; a part of another organisation is 422)',
			tags: ['Settings'],
			requestBody: json(digestSettingsSchema),
			responses: { '200': answer, ...errors }
		}
	}
};
