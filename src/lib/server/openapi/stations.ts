/** Machine stations: keys, frame mappings and the sample endpoint a station posts to. */
import type { ZodOpenApiPathsObject } from 'zod-openapi';
import { frameMappingSchema, MAX_STATION_PINS, stationKeySchema, stationSampleSchema } from '$lib/schemas/station';
import { errors, id, json, op } from './common';

export const stationsPaths: ZodOpenApiPathsObject = {
	'/station-keys': {
		get: op('Station keys of the organisation (admins); never the secret', ['Stations']),
		post: op(
			'Make a station key (admins): the answer holds { key, secret }, and the secret is shown this once',
			['Stations'],
			{ requestBody: json(stationKeySchema) },
			{ status: '201' }
		)
	},
	'/station-keys/{keyId}': {
		delete: op('Revoke a station key (admins): posts with it are refused from now on', ['Stations'], {
			requestParams: { path: id('keyId') }
		})
	},
	'/views/{viewId}/frame-mapping': {
		get: op('How a station’s image maps onto the view’s drawing (mapping is null when none is set)', ['Stations'], {
			requestParams: { path: id('viewId') }
		}),
		put: op(
			'Set the frame mapping from three matching points (engineers, admins); refused when it misses a point by over 0.5 % of the drawing',
			['Stations'],
			{ requestParams: { path: id('viewId') }, requestBody: json(frameMappingSchema) }
		)
	},
	'/station/samples': {
		post: {
			summary: 'A station posts one inspected sample with its findings; it is stored closed',
			description: [
				'Authentication: `Authorization: Bearer stk_…` with a station key; no session cookie.',
				'The key may write only its own parts. The sample id and pin ids are the station’s: sending the same',
				'sample again stores nothing new and answers 200 with what is stored (201 the first time).',
				'Each pin gives x and y on the drawing (0–1) or frame: { x, y } in the station’s image pixels, mapped',
				`through the view’s frame mapping. At most ${MAX_STATION_PINS} pins; any bad pin refuses the whole sample (422).`
			].join(' '),
			tags: ['Stations'],
			requestBody: json(stationSampleSchema),
			responses: {
				'200': { description: 'Already stored: the stored sample', content: { 'application/json': {} } },
				'201': { description: 'Stored: the sample with its units and pins', content: { 'application/json': {} } },
				...errors,
				'401': {
					description: 'No station key, an unknown one, or a revoked one',
					content: errors['401'].content
				},
				'403': { description: 'The key may not write this part', content: errors['403'].content }
			}
		}
	}
};
