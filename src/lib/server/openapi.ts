/**
 * The public API described as an OpenAPI 3.1 document, generated from the same zod schemas the
 * endpoints validate with (zod-openapi), so the description cannot drift from what is enforced.
 * Served at /api/v1/openapi.json.
 */
import { z } from 'zod';
import { createDocument, type ZodOpenApiPathsObject } from 'zod-openapi';
import { chartQueryFields, limitSetPatchSchema, limitSetSchema } from '$lib/schemas/chart';
import { densityQuerySchema } from '$lib/schemas/density';
import { repairActionSchema, repairListSchema, repairSchema } from '$lib/schemas/repair';
import { defectTypeCreateSchema, defectTypePatchSchema } from '$lib/schemas/defect';
import { gridSchema, regionSchema } from '$lib/schemas/drawing';
import { historyUploadQuerySchema } from '$lib/schemas/history';
import { partPatchSchema, partQuerySchema, partSchema, viewSchema } from '$lib/schemas/part';
import { samplingPlanSchema } from '$lib/schemas/plan';
import {
	correctionQuerySchema,
	pinPatchSchema,
	pinSchema,
	startSampleSchema,
	unitPatchSchema
} from '$lib/schemas/sample';
import { signalActionSchema, signalListSchema } from '$lib/schemas/signal';
import { toolPatchSchema, toolSchema } from '$lib/schemas/tool';

import { errors, id, image, json, op } from './openapi/common';
import { digestPaths } from './openapi/digest';
import { exportsPaths } from './openapi/exports';
import { reportPaths } from './openapi/report';
import { stationsPaths } from './openapi/stations';

const paths: ZodOpenApiPathsObject = {
	'/health': { get: op('Is the service up', ['System']) },
	'/me': { get: op('The signed-in user, organisation and role', ['System']) },
	'/parts': {
		get: op('Parts, searched and paged', ['Setup'], { requestParams: { query: partQuerySchema } }),
		post: op('Create a part', ['Setup'], { requestBody: json(partSchema) }, { status: '201' })
	},
	'/parts/{partId}': {
		get: op('One part', ['Setup'], { requestParams: { path: id('partId') } }),
		patch: op('Change or archive a part', ['Setup'], {
			requestParams: { path: id('partId') },
			requestBody: json(partPatchSchema)
		})
	},
	'/parts/{partId}/views': {
		get: op('Views of a part with their revisions', ['Setup'], { requestParams: { path: id('partId') } }),
		post: op('Add a view', ['Setup'], { requestParams: { path: id('partId') }, requestBody: json(viewSchema) })
	},
	'/views/{viewId}/revisions': {
		post: op(
			'Upload a drawing as a new revision (PNG, JPEG, WebP, TIFF or SVG as the body)',
			['Setup'],
			{ requestParams: { path: id('viewId') }, requestBody: image },
			{ status: '201' }
		)
	},
	'/revisions/{revisionId}': {
		get: op('A drawing revision with its grid and regions', ['Setup'], { requestParams: { path: id('revisionId') } }),
		patch: op('Set the zone grid', ['Setup'], {
			requestParams: { path: id('revisionId') },
			requestBody: json(gridSchema)
		})
	},
	'/revisions/{revisionId}/regions': {
		post: op('Add a named region', ['Setup'], {
			requestParams: { path: id('revisionId') },
			requestBody: json(regionSchema)
		})
	},
	'/parts/{partId}/plan': {
		put: op('Set the sampling plan', ['Setup'], {
			requestParams: { path: id('partId') },
			requestBody: json(samplingPlanSchema)
		})
	},
	'/defect-types': {
		get: op('The defect catalogue', ['Setup']),
		post: op('Add a defect type', ['Setup'], { requestBody: json(defectTypeCreateSchema) }, { status: '201' })
	},
	'/defect-types/{defectTypeId}': {
		patch: op('Change, retire or restore a defect type', ['Setup'], {
			requestParams: { path: id('defectTypeId') },
			requestBody: json(defectTypePatchSchema)
		})
	},
	'/tools': {
		get: op('Dies, moulds and fixtures', ['Setup']),
		post: op('Add a tool', ['Setup'], { requestBody: json(toolSchema) }, { status: '201' })
	},
	'/tools/{toolId}': {
		patch: op('Change a tool', ['Setup'], { requestParams: { path: id('toolId') }, requestBody: json(toolPatchSchema) })
	},
	'/samples': {
		post: op(
			'Start a sample (or resume your open one for the part); pass your own id to make retries safe',
			['Bench'],
			{ requestBody: json(startSampleSchema) },
			{ status: '201' }
		)
	},
	'/samples/{sampleId}': {
		get: op('A sample with its units and pins', ['Bench'], { requestParams: { path: id('sampleId') } })
	},
	'/samples/{sampleId}/pins': {
		post: op(
			'Place a pin. The id is yours (UUIDv7): the same pin sent again is stored once (200 instead of 201)',
			['Bench'],
			{ requestParams: { path: id('sampleId') }, requestBody: json(pinSchema) },
			{ status: '201' }
		)
	},
	'/samples/{sampleId}/units/{index}': {
		patch: op('Mark a unit clean, or give its serial', ['Bench'], {
			requestParams: { path: z.object({ sampleId: z.uuid(), index: z.int().min(1) }) },
			requestBody: json(unitPatchSchema)
		})
	},
	'/samples/{sampleId}/close': {
		post: op('Close the sample once every unit is marked clean or pinned', ['Bench'], {
			requestParams: { path: id('sampleId') }
		})
	},
	'/samples/{sampleId}/changes': {
		get: op('Corrections made after close', ['Bench'], { requestParams: { path: id('sampleId') } })
	},
	'/pins/{pinId}': {
		patch: op('Move, retype or annotate a pin (a reason once the sample is closed)', ['Bench'], {
			requestParams: { path: id('pinId') },
			requestBody: json(pinPatchSchema)
		}),
		delete: op(
			'Remove a pin',
			['Bench'],
			{ requestParams: { path: id('pinId'), query: correctionQuerySchema } },
			{ status: '204', description: 'Removed' }
		)
	},
	'/pins/{pinId}/photos/{photoId}': {
		put: op(
			'Add a photo of a pinned defect (JPEG, PNG or WebP as the body); the photo id is yours',
			['Bench'],
			{
				requestParams: { path: z.object({ pinId: z.uuid(), photoId: z.uuid() }), query: correctionQuerySchema },
				requestBody: image
			},
			{ status: '201' }
		)
	},
	'/parts/{partId}/chart': {
		get: op('A control chart of the part, judged by the limit sets in force', ['Trends'], {
			requestParams: { path: id('partId'), query: chartQueryFields }
		})
	},
	'/parts/{partId}/limit-sets': {
		get: op('Every limit set of the part', ['Trends'], { requestParams: { path: id('partId') } }),
		post: op(
			'Trial limits from a period or chosen samples, less exclusions',
			['Trends'],
			{ requestParams: { path: id('partId') }, requestBody: json(limitSetSchema) },
			{ status: '201' }
		)
	},
	'/limit-sets/{limitSetId}': {
		patch: op('Change the exclusions of trial limits and recompute', ['Trends'], {
			requestParams: { path: id('limitSetId') },
			requestBody: json(limitSetPatchSchema)
		})
	},
	'/limit-sets/{limitSetId}/freeze': {
		post: op('Freeze trial limits: they judge every later point', ['Trends'], {
			requestParams: { path: id('limitSetId') }
		})
	},
	'/history-imports/{importId}': {
		delete: op(
			'Remove an imported file and its rows',
			['Trends'],
			{ requestParams: { path: id('importId') } },
			{ status: '204', description: 'Removed' }
		)
	},
	'/parts/{partId}/history': {
		get: op('Earlier imports of count-only history', ['Trends'], { requestParams: { path: id('partId') } }),
		post: op(
			'Import count-only history: CSV with sample,taken_at,size,count[,defect_type,tool,cavity,shift,lot]; all or nothing',
			['Trends'],
			{
				requestParams: { path: id('partId'), query: historyUploadQuerySchema },
				requestBody: {
					content: {
						'text/csv': {
							schema: z.string().meta({ example: 'sample,taken_at,size,count,defect_type\nS-1,2026-03-02,5,3,SK\n' })
						}
					}
				}
			},
			{ status: '201' }
		)
	},
	'/views/{viewId}/density.json': {
		get: op('Density map of a view: pins binned in SQL, smoothed, per 100 units inspected', ['Hot spots'], {
			requestParams: { path: id('viewId'), query: densityQuerySchema }
		})
	},
	'/views/{viewId}/density.png': {
		get: {
			summary: 'The density map over the drawing as a PNG',
			tags: ['Hot spots'],
			requestParams: { path: id('viewId'), query: densityQuerySchema },
			responses: { '200': { description: 'PNG', content: { 'image/png': {} } }, ...errors }
		}
	},
	'/views/{viewId}/zones.csv': {
		get: {
			summary: 'The zone ranking as CSV (UTF-8 with BOM)',
			tags: ['Hot spots'],
			requestParams: { path: id('viewId'), query: densityQuerySchema },
			responses: { '200': { description: 'CSV', content: { 'text/csv': {} } }, ...errors }
		}
	},
	'/views/{viewId}/zones.json': {
		get: op('Zone ranking of a view with the chi-square test and the Clark–Evans ratio', ['Hot spots'], {
			requestParams: { path: id('viewId'), query: densityQuerySchema }
		})
	},
	'/repairs': {
		get: op('Repair requests (open by default; mine=1 for your queue)', ['Repairs'], {
			requestParams: { query: repairListSchema }
		}),
		post: op('Request a repair with its evidence', ['Repairs'], { requestBody: json(repairSchema) }, { status: '201' })
	},
	'/repairs/{repairId}': {
		get: op('One repair', ['Repairs'], { requestParams: { path: id('repairId') } }),
		post: op('Accept, mark done, verified or not verified', ['Repairs'], {
			requestParams: { path: id('repairId') },
			requestBody: json(repairActionSchema)
		})
	},
	'/repairs/{repairId}/evidence.png': {
		get: {
			summary: 'The density map frozen with the request',
			tags: ['Repairs'],
			requestParams: { path: id('repairId') },
			responses: { '200': { description: 'PNG', content: { 'image/png': {} } }, ...errors }
		}
	},
	'/repairs/{repairId}/photos': {
		get: op('Photos of the repaired tool', ['Repairs'], { requestParams: { path: id('repairId') } })
	},
	'/repairs/{repairId}/photos/{photoId}': {
		put: op(
			'Add a photo of the repaired tool (JPEG, PNG or WebP as the body) while the repair is accepted or done; the photo id is yours',
			['Repairs'],
			{ requestParams: { path: z.object({ repairId: z.uuid(), photoId: z.uuid() }) }, requestBody: image },
			{ status: '201' }
		)
	},
	'/repairs/{repairId}/verification': {
		get: op('Before against after the repair date: exact test for two Poisson rates', ['Repairs'], {
			requestParams: { path: id('repairId') }
		})
	},
	'/signals': {
		get: op('Signals (run-rule violations on frozen limits)', ['Signals'], {
			requestParams: { query: signalListSchema }
		})
	},
	'/signals/{signalId}': {
		post: op('Acknowledge, explain or close a signal', ['Signals'], {
			requestParams: { path: id('signalId') },
			requestBody: json(signalActionSchema)
		})
	},
	'/events': {
		get: {
			summary:
				'Server-sent events: sample.closed, signals.new, signals.changed, history.imported, repair.changed, resync',
			tags: ['Live'],
			requestParams: { query: z.object({ part: z.uuid().optional() }) },
			responses: { '200': { description: 'An event stream', content: { 'text/event-stream': {} } }, ...errors }
		}
	},
	...exportsPaths,
	...reportPaths,
	...stationsPaths,
	...digestPaths
};

let cached: ReturnType<typeof createDocument> | undefined;

export function openApiDocument() {
	cached ??= createDocument({
		openapi: '3.1.0',
		info: {
			title: 'Stipple API',
			version: '1',
			description:
				'Defect pins, samples and control charts. Sign in with a session cookie; every 4xx answer has the Error shape.'
		},
		servers: [{ url: '/api/v1' }],
		paths
	});
	return cached;
}
