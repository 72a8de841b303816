/** The CSV downloads of a part under the Trends filters (streamed; UTF-8, ISO 8601 times in UTC). */
import type { ZodOpenApiOperationObject, ZodOpenApiPathsObject } from 'zod-openapi';
import { exportQueryFields } from '$lib/schemas/export';
import { errors, id } from './common';

const csv = (summary: string, example: string): ZodOpenApiOperationObject => ({
	summary,
	tags: ['Trends'],
	requestParams: { path: id('partId'), query: exportQueryFields },
	responses: {
		'200': {
			description:
				'CSV (RFC 4180, CR LF), a download named by the part number and the day; bom=1 begins it with the UTF-8 byte-order mark. Text beginning with =, +, - or @ carries a leading apostrophe.',
			content: { 'text/csv': { example } }
		},
		...errors
	}
});

export const exportsPaths: ZodOpenApiPathsObject = {
	'/parts/{partId}/pins.csv': {
		get: csv(
			'Every live pin of the closed samples under the chart filters, oldest sample first',
			'sample,unit,view,revision,type,type_name,x,y,zone,regions,inspector,source,time,sample_taken_at\r\n'
		)
	},
	'/parts/{partId}/samples.csv': {
		get: csv(
			'Every closed sample under the chart filters, with its pins per defect type (a type, zone or region narrows the counts) and in all',
			'sample,taken_at,size,unit_count,tool,cavity,shift,lot,inspector,source,SK,FL,total\r\n'
		)
	},
	'/parts/{partId}/chart.csv': {
		get: csv(
			'The chart’s points as GET /parts/{partId}/chart computes them, with centre, limits, signals and the limit set in force',
			'sample,taken_at,source,size,count,value,centre,lcl,ucl,z,signals,excluded,phase,limit_set,limits\r\n'
		)
	}
};
