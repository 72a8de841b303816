/** The report of a part and period, as a PDF. */
import type { ZodOpenApiPathsObject } from 'zod-openapi';
import { reportQueryFields } from '$lib/schemas/report';
import { errors, id } from './common';

export const reportPaths: ZodOpenApiPathsObject = {
	'/parts/{partId}/report.pdf': {
		get: {
			summary:
				'The report of a part and period (the last 30 days by default), optionally for a tool and cavity, as an A4 PDF',
			description:
				'Summary, u-chart with stepping limits and signals, per-type charts of the three most frequent types, Pareto, ' +
				'density map with its legend, zone ranking, signals with their explanations, repairs with verification, the limit ' +
				'set in force, the sampling plan and the cautions. Any member of the organisation may download it.',
			tags: ['Reports'],
			requestParams: { path: id('partId'), query: reportQueryFields },
			responses: {
				'200': {
					description: 'PDF, sent as an attachment named stipple-report-<part>-<from>-<to>.pdf',
					content: { 'application/pdf': {} }
				},
				...errors
			}
		}
	}
};
